/**
 * Prism against decentration along the current direction, from the optical centre to the
 * lens edge (uPlot): the four answers as curves with a marker at the current point, and the
 * Prentice error (%) in a second chart. The data are the engine's prismProfile.
 */
import uPlot from 'uplot';
import type { PrismProfile } from '../../optics/index.ts';
import { COLORS, css } from '../../scene/palette.ts';
import { num } from '../format.ts';

export interface ProfileInput {
  profile: PrismProfile;
  directionDeg: number;
  decentrationMm: number;
  /** values at the current point (Δ and %), null where there is none */
  current: { prentice: number; paraxial: number; exact: number | null; focimeter: number | null; errorPercent: number | null };
}

const nullIfNaN = (a: Float64Array): (number | null)[] => Array.from(a, (v) => (Number.isFinite(v) ? v : null));

function fmtVal(unit: string, decimals: number) {
  return (_u: uPlot, v: number | null): string => (v === null || !Number.isFinite(v) ? '—' : `${num(v, decimals)} ${unit}`);
}

export class ProfilePlot {
  private readonly host: HTMLElement;
  private readonly prismBox: HTMLElement;
  private readonly errorBox: HTMLElement;
  private prism: uPlot | null = null;
  private error: uPlot | null = null;
  private current: ProfileInput | null = null;
  private readonly resizeObserver: ResizeObserver;
  /** a click in a chart asks for the visual point at that decentration (mm) along the direction */
  onPick: ((decentrationMm: number) => void) | null = null;

  constructor(host: HTMLElement) {
    this.host = host;
    this.prismBox = document.createElement('div');
    this.prismBox.className = 'plot plot-prism';
    this.errorBox = document.createElement('div');
    this.errorBox.className = 'plot plot-error';
    host.append(this.prismBox, this.errorBox);
    this.resizeObserver = new ResizeObserver(() => this.resize());
    this.resizeObserver.observe(host);
  }

  private sizes(): { w: number; h: number } {
    const w = Math.max(180, Math.floor((this.host.clientWidth - 24) / 2));
    const h = Math.max(120, this.host.clientHeight - 52);
    return { w, h };
  }

  private marker = (u: uPlot): void => {
    const c = this.current;
    if (!c) return;
    const ctx = u.ctx;
    const x = u.valToPos(c.decentrationMm, 'x', true);
    ctx.save();
    ctx.strokeStyle = 'rgba(40, 50, 60, 0.55)';
    ctx.setLineDash([4, 3]);
    ctx.lineWidth = 1.2 * devicePixelRatio;
    ctx.beginPath();
    ctx.moveTo(x, u.bbox.top);
    ctx.lineTo(x, u.bbox.top + u.bbox.height);
    ctx.stroke();
    ctx.setLineDash([]);
    const dots: [number | null, number, string][] = u === this.error
      ? [[c.current.errorPercent, COLORS.prentice, 'y']]
      : [[c.current.prentice, COLORS.prentice, 'y'], [c.current.paraxial, COLORS.paraxial, 'y'],
        [c.current.exact, COLORS.exact, 'y'], [c.current.focimeter, COLORS.focimeter, 'y']];
    for (const [v, col, scale] of dots) {
      if (v === null || !Number.isFinite(v)) continue;
      const y = u.valToPos(v, scale, true);
      ctx.fillStyle = css(col);
      ctx.strokeStyle = '#1b2530';
      ctx.lineWidth = 1.2 * devicePixelRatio;
      ctx.beginPath();
      ctx.arc(x, y, 4.2 * devicePixelRatio, 0, 2 * Math.PI);
      ctx.fill();
      ctx.stroke();
    }
    ctx.restore();
  };

  private make(box: HTMLElement, title: string, yLabel: string, series: uPlot.Series[]): uPlot {
    const { w, h } = this.sizes();
    const u = new uPlot({
      title, width: w, height: h,
      scales: { x: { time: false } },
      axes: [
        { label: 'decentration (mm)', stroke: '#3d4a57', grid: { stroke: 'rgba(0,0,0,0.07)' }, ticks: { stroke: 'rgba(0,0,0,0.2)' } },
        { label: yLabel, stroke: '#3d4a57', grid: { stroke: 'rgba(0,0,0,0.07)' }, ticks: { stroke: 'rgba(0,0,0,0.2)' }, size: 52 },
      ],
      series: [{ label: 'c', value: fmtVal('mm', 1) }, ...series],
      legend: { live: false },
      cursor: { drag: { x: false, y: false } },
      hooks: { draw: [this.marker] },
    }, [[], ...series.map(() => [])], box);
    u.over.addEventListener('click', (e) => {
      const rect = u.over.getBoundingClientRect();
      const v = u.posToVal(e.clientX - rect.left, 'x');
      if (Number.isFinite(v)) this.onPick?.(Math.max(0, v));
    });
    u.over.title = 'Click to move the visual point to this decentration';
    return u;
  }

  update(inp: ProfileInput): void {
    this.current = inp;
    const p = inp.profile;
    const x = Array.from(p.decentrationMm);
    if (!this.prism) {
      this.prism = this.make(this.prismBox, 'Prism along the direction', 'prism (Δ)', [
        { label: 'Prentice', stroke: css(COLORS.prentice), width: 2, dash: [8, 4], value: fmtVal('Δ', 2) },
        { label: 'first-order', stroke: css(COLORS.paraxial), width: 2, dash: [3, 3], value: fmtVal('Δ', 2) },
        { label: 'exact', stroke: css(COLORS.exact), width: 3, value: fmtVal('Δ', 2) },
        { label: 'focimeter', stroke: css(COLORS.focimeter), width: 1.5, value: fmtVal('Δ', 2) },
      ]);
      this.error = this.make(this.errorBox, 'Prentice error', 'Prentice error (%)', [
        { label: 'Prentice error', stroke: css(COLORS.prentice), width: 2, value: fmtVal('%', 1) },
      ]);
    }
    this.prism.setData([x, nullIfNaN(p.prentice), nullIfNaN(p.paraxial), nullIfNaN(p.exact), nullIfNaN(p.focimeter)] as uPlot.AlignedData);
    this.error!.setData([x, nullIfNaN(p.errorPercent)] as uPlot.AlignedData);
    this.setTitles(inp.directionDeg);
  }

  private setTitles(dir: number): void {
    const t1 = this.prismBox.querySelector('.u-title');
    const t2 = this.errorBox.querySelector('.u-title');
    if (t1) t1.textContent = `Prism along ${num(dir, 1)}° from the OC`;
    if (t2) t2.textContent = 'Prentice error, % of exact';
  }

  resize(): void {
    const { w, h } = this.sizes();
    this.prism?.setSize({ width: w, height: h });
    this.error?.setSize({ width: w, height: h });
  }

  dispose(): void {
    this.resizeObserver.disconnect();
    this.prism?.destroy();
    this.error?.destroy();
  }
}
