/**
 * Prism map worker: runs computeMap (mapCompute.ts) off the page's thread, so the page never
 * blocks. One request at a time; the page sends only the newest case.
 */
import { computeMap } from './mapCompute.ts';
import type { MapRequest, MapResponse } from './mapProtocol.ts';

self.onmessage = (e: MessageEvent<MapRequest>) => {
  const req = e.data;
  let res: MapResponse;
  try {
    res = computeMap(req);
    (self as unknown as Worker).postMessage(res, [res.rgba.buffer, res.values.buffer]);
  } catch (err) {
    res = { id: req.id, ok: false, message: (err as Error).message };
    (self as unknown as Worker).postMessage(res);
  }
};
