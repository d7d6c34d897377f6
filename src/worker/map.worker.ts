/**
 * Map worker: runs computeMap (the prism map) and, when asked, computePowerMaps (the power
 * maps, a second message) (mapCompute.ts) off the page's thread, so the page never blocks.
 * One request at a time; the page sends only the newest case.
 */
import { computeMap, computePowerMaps } from './mapCompute.ts';
import type { MapRequest, MapResponse } from './mapProtocol.ts';

self.onmessage = (e: MessageEvent<MapRequest>) => {
  const req = e.data;
  const post = (res: MapResponse, transfer: Transferable[] = []) => (self as unknown as Worker).postMessage(res, transfer);
  try {
    const res = computeMap(req);
    post(res, [res.rgba.buffer, res.values.buffer]);
    if (req.power) {
      const p = computePowerMaps(req);
      post(p, [p.mean.rgba.buffer, p.mean.values.buffer, p.astigmatism.rgba.buffer, p.astigmatism.values.buffer]);
    }
  } catch (err) {
    post({ id: req.id, ok: false, message: (err as Error).message });
  }
};
