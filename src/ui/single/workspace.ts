/**
 * The "single lens" workspace: the controls on the left, the 3-D view with the cross-section,
 * the prism profile and the maps (prism, mean and astigmatic error) under it, and the
 * computation panel on the right. It owns its state (the case as typed, the display
 * settings, the last valid result), builds its own elements inside the element it is given,
 * and keeps the address bar in step with its case (docs/visualiser.md). Other workspaces
 * reach it through `open` (the range workspace opens a lens of its table here).
 */
import { type ViewCase, type ViewDisplay, type ViewField, caseToQuery } from '../../case/url.ts';
import { DEMO_CASE, DEMO_DESCRIPTION, DEMO_TITLE } from '../../demo/demoCase.ts';
import { DecentraScene } from '../../scene/decentraScene.ts';
import { COLORS, css } from '../../scene/palette.ts';
import { allocateRayPaths, buildRayPaths } from '../../scene/rayPaths.ts';
import { VIEW_NAMES, type ViewName } from '../../scene/viewer.ts';
import { num } from '../format.ts';
import { History, bindUndoKeys, undoButtons } from '../history.ts';
import { copyLink } from '../copyLink.ts';
import { el, invalidInputText } from '../resultsPane.ts';
import { type Computed, computeCase } from './compute.ts';
import { Controls } from './controls.ts';
import { CrossSection } from './crossSection.ts';
import { MapView } from './mapView.ts';
import { Panel } from './panel.ts';
import { pointFocalEdit } from './pointFocal.ts';
import { ProfilePlot } from './profilePlot.ts';

export interface SingleLensOptions {
  /** the case and display to start from (a link, what was saved, or the demo) */
  viewCase: ViewCase;
  display: ViewDisplay;
  /** the header's case badge: what the case is (demo or the person's own) */
  badge: { host: HTMLElement; kind: HTMLElement; desc: HTMLElement };
  /** the case's query changed (written to the address bar at the same moment) */
  onQuery?: (query: string) => void;
  /** a short message to the person (the page's toast) */
  toast: (text: string) => void;
}

type Tab = ViewDisplay['tab'];

const TABS: [Tab, string][] = [['section', 'Cross-section'], ['profile', 'Prism along the direction'], ['map', 'Prism map, power maps']];

export class SingleLensWorkspace {
  readonly root: HTMLElement;
  readonly scene: DecentraScene;
  readonly controls: Controls;
  readonly panel: Panel;
  readonly section: CrossSection;
  readonly profile: ProfilePlot;
  readonly map: MapView;
  private viewCase: ViewCase;
  private display: ViewDisplay;
  private last: Computed | null = null;
  private lastMapKey = '';
  private lastDirection = 0;
  private readonly paths = allocateRayPaths();
  private readonly dirty = { section: true, profile: true };
  private readonly tabs: HTMLButtonElement[] = [];
  private readonly panes = new Map<Tab, HTMLElement>();
  private readonly stale: HTMLElement;
  private readonly mag: HTMLElement;
  private urlTimer = 0;
  /** the 3-D view draws the pencil and its focal lines (a view setting of this page) */
  private showPencil = false;
  private readonly pencilKey: HTMLLIElement;
  /** the valid cases this workspace has shown, for undo and redo (docs/visualiser.md) */
  private history: History<ViewCase> | null = null;
  private readonly syncUndo: (canUndo: boolean, canRedo: boolean) => void;
  /** what the end-to-end tests and the browser benchmark read (see hook()) */
  private readonly counters = { updates: 0, lastUpdateMs: 0 };

  constructor(root: HTMLElement, private readonly o: SingleLensOptions) {
    this.root = root;
    this.viewCase = o.viewCase;
    this.display = o.display;

    // the elements: controls | 3-D view over the views | panel
    const controlsHost = el('aside', 'controls');
    controlsHost.id = 'controls';
    controlsHost.setAttribute('aria-label', 'Case inputs');
    const centre = el('section', 'centre');
    const viewport = el('div', 'viewport');
    viewport.id = 'viewport';
    const viewButtons = el('div', 'view-buttons');
    viewButtons.id = 'view-buttons';
    viewButtons.setAttribute('role', 'toolbar');
    viewButtons.setAttribute('aria-label', 'Preset views');
    this.stale = el('div', 'viewport-stale');
    this.stale.id = 'viewport-stale';
    this.stale.setAttribute('role', 'alert');
    this.stale.hidden = true;
    const left = el('div', 'viewport-left');
    this.mag = el('div', 'viewport-mag');
    this.mag.id = 'viewport-mag';
    this.mag.hidden = true;
    const key = el('ul', 'ray-key');
    key.id = 'ray-key';
    key.setAttribute('aria-label', 'Key to the rays');
    left.append(this.mag, key);
    const hint = el('p', 'viewport-hint', 'Drag to orbit, right-drag to pan, wheel to zoom. Drag the yellow visual point, or double-click the lens.');
    viewport.append(viewButtons, this.stale, left, hint);

    const views = el('div', 'views');
    const tabList = el('div', 'tabs');
    tabList.setAttribute('role', 'tablist');
    tabList.setAttribute('aria-label', 'Views');
    views.append(tabList);
    for (const [name, label] of TABS) {
      const t = el('button', undefined, label);
      t.type = 'button';
      t.setAttribute('role', 'tab');
      t.id = `tab-${name}`;
      t.setAttribute('aria-controls', `pane-${name}`);
      t.dataset.tab = name;
      tabList.append(t);
      this.tabs.push(t);
      const pane = el('div', 'pane');
      pane.setAttribute('role', 'tabpanel');
      pane.id = `pane-${name}`;
      pane.setAttribute('aria-labelledby', `tab-${name}`);
      views.append(pane);
      this.panes.set(name, pane);
    }
    centre.append(viewport, views);
    const results = el('aside', 'results');
    results.id = 'results';
    results.setAttribute('aria-label', 'Computation panel');
    root.replaceChildren(controlsHost, centre, results);

    this.scene = new DecentraScene(viewport);
    this.panel = new Panel(results);
    this.section = new CrossSection(this.panes.get('section')!);
    this.profile = new ProfilePlot(this.panes.get('profile')!);
    this.map = new MapView(this.panes.get('map')!);
    this.controls = new Controls(controlsHost, this.viewCase, this.display, {
      onCase: (c, field) => { this.viewCase = c; this.update(field); },
      onRefused: (field, message) => this.showInvalid(field, message),
      onDisplay: (d) => { this.display = { ...d, tab: this.display.tab }; this.dirty.section = true; this.update(null); },
      onRestoreDemo: () => { this.viewCase = { ...DEMO_CASE }; this.controls.setCase(this.viewCase); this.update(null); },
      onCopyLink: () => this.copyLink(),
      onPencil: (on) => {
        this.showPencil = on;
        this.pencilKey.style.display = on ? '' : 'none';
        this.update(null);
        // the pencil can reach far beyond the eye: frame the view so that it shows
        if (on) this.scene.reframe();
      },
      onPointFocal: (ask) => {
        const out = pointFocalEdit(this.viewCase, ask);
        if (!out.ok) return { ok: false, message: `Not applied: ${out.message}.` };
        this.viewCase = out.case;
        this.controls.setCase(this.viewCase);
        this.update('front');
        return { ok: true, message: out.message };
      },
    });

    // undo and redo of case edits: buttons above the controls, and the keys
    const undo = { undo: () => this.stepHistory('undo'), redo: () => this.stepHistory('redo') };
    this.syncUndo = undoButtons(controlsHost, undo, 'single');
    bindUndoKeys(root, undo);

    // preset views
    for (const [name, label] of Object.entries(VIEW_NAMES) as [ViewName, string][]) {
      const b = el('button', undefined, label);
      b.type = 'button';
      b.dataset.view = name;
      b.title = name === 'side' ? 'Side view, from the wearer’s right' : name === 'top' ? 'From above' : label;
      b.addEventListener('click', () => {
        this.scene.setView(name);
        for (const other of viewButtons.querySelectorAll('button')) other.setAttribute('aria-pressed', String(other === b));
      });
      viewButtons.append(b);
    }

    // key to the rays
    for (const [cls, color, text] of [
      ['', COLORS.exact, 'exact line of sight (traced)'],
      ['dashed', COLORS.prentice, 'Prentice’s rule, predicted'],
      ['dotted', COLORS.paraxial, 'first-order thick lens, predicted'],
      ['dotted', COLORS.undeviated, 'no lens (eye-side line continued)'],
    ] as const) {
      const li = el('li');
      const sw = el('span', `swatch ${cls}`);
      sw.style.borderTopColor = css(color);
      li.append(sw, text);
      key.append(li);
    }
    this.pencilKey = el('li');
    this.pencilKey.style.display = 'none';
    const psw = el('span', 'swatch');
    psw.style.borderTopColor = css(COLORS.visualPoint);
    this.pencilKey.append(psw, 'pencil, focal lines (dashed: virtual)');
    key.append(this.pencilKey);

    // tabs
    for (const t of this.tabs) {
      t.addEventListener('click', () => this.showTab(t.dataset.tab as Tab));
      t.addEventListener('keydown', (e) => {
        if (e.key !== 'ArrowRight' && e.key !== 'ArrowLeft') return;
        const i = this.tabs.indexOf(t), j = (i + (e.key === 'ArrowRight' ? 1 : this.tabs.length - 1)) % this.tabs.length;
        this.tabs[j]!.focus();
        this.showTab(this.tabs[j]!.dataset.tab as Tab);
      });
    }

    // picking the visual point in the scene, on the map or on the profile chart
    this.scene.onPointPick = (x, y) => this.setPoint(x, y);
    this.map.onPick = (x, y) => this.setPoint(x, y);
    this.profile.onPick = (d) => {
      const r = this.last;
      if (!r) return;
      const a = (r.directionDeg * Math.PI) / 180;
      const dd = Math.min(d, r.lens.radiusMm - 0.1);
      this.setPoint(Math.round(dd * Math.cos(a) * 10) / 10, Math.round(dd * Math.sin(a) * 10) / 10);
    };
    window.addEventListener('pagehide', () => this.writeUrlNow());
  }

  /** Show the starting tab and compute the starting case (once the page's services are up). */
  start(): void {
    this.showTab(this.display.tab);
    this.update(null);
  }

  /** The case as typed (a copy). */
  getCase(): ViewCase {
    return { ...this.viewCase };
  }

  /**
   * Open a case from elsewhere in the app (the range workspace's table): the fields take its
   * values and the views follow, as if it had been typed. The case is checked as any typed
   * case is; a refused value shows at its field.
   */
  open(c: ViewCase): void {
    this.viewCase = { ...c };
    this.controls.setCase(this.viewCase);
    this.update(null);
  }

  /** Undo or redo: the whole case comes back, in the fields, the views and the address bar. */
  private stepHistory(which: 'undo' | 'redo'): void {
    const c = which === 'undo' ? this.history?.undo() : this.history?.redo();
    if (!c) return;
    this.viewCase = { ...c };
    this.controls.setCase(this.viewCase);
    this.update(null);
  }

  private showTab(name: Tab): void {
    this.display = { ...this.display, tab: name };
    for (const t of this.tabs) {
      const on = t.dataset.tab === name;
      t.setAttribute('aria-selected', String(on));
      t.tabIndex = on ? 0 : -1;
      this.panes.get(t.dataset.tab as Tab)!.hidden = !on;
    }
    if (name === 'profile') this.profile.resize();
    this.drawTabs();
    this.writeUrl();
  }

  /** Draw the cross-section or the profile if it is on screen and out of date. */
  private drawTabs(): void {
    const r = this.last;
    if (!r) return;
    const a = r.answers;
    const { display, dirty } = this;
    if (display.tab === 'section' && dirty.section) {
      dirty.section = false;
      buildRayPaths(a, display.mag, 70, this.paths);
      this.section.draw({ lens: r.lens, crMm: r.tc.crMm, directionDeg: r.directionDeg, decentrationMm: r.decentrationMm, paths: this.paths, mag: display.mag });
    }
    if (display.tab === 'profile' && dirty.profile) {
      dirty.profile = false;
      this.profile.update({
        profile: r.profile, directionDeg: r.directionDeg, decentrationMm: r.decentrationMm,
        current: {
          prentice: a.prentice.magnitude, paraxial: a.paraxial.magnitude,
          exact: 'failure' in a.exact ? null : a.exact.magnitude,
          focimeter: 'failure' in a.focimeter ? null : a.focimeter.magnitude,
          errorPercent: a.error?.percent ?? null,
        },
      });
    }
  }

  private setPoint(x: number, y: number): void {
    const c = { ...this.viewCase };
    if (c.pointMode === 'polar') {
      let a = (Math.atan2(y, x) * 180) / Math.PI;
      if (a < 0) a += 360;
      c.dir = num(Math.hypot(x, y) > 0 ? a : 0, 1);
      c.dist = num(Math.hypot(x, y), 1);
    } else {
      c.x = num(x, 1);
      c.y = num(y, 1);
    }
    this.viewCase = c;
    this.controls.setCase(c);
    this.update(c.pointMode === 'polar' ? 'dist' : 'x');
  }

  /** Recompute and redraw everything for the current case (synchronously; the 3-D frame follows). */
  private update(field: ViewField | null): void {
    const t0 = performance.now();
    const { display, scene, map, panel } = this;
    const out = computeCase(this.viewCase, this.lastDirection);
    if (out.ok) {
      const r = out.result;
      this.last = r;
      this.lastDirection = r.directionDeg;
      this.controls.showError(null, null);
      this.stale.hidden = true;
      map.setStale(false);
      const a = r.answers;
      const label = (name: string, d: { magnitude: number } | { failure: string }): string =>
        'failure' in d ? `${name}: no answer` : `${name} ${num(d.magnitude, 2)} Δ`;
      scene.update({
        lens: r.lens, crMm: r.tc.crMm, answers: a, pencil: r.pencil,
        labels: {
          exact: label('exact', a.exact),
          prentice: `${label('Prentice', a.prentice)}${a.error ? ` (${a.error.prism > 0 ? '+' : ''}${num(a.error.prism, 2)} Δ)` : ''}`,
          paraxial: label('first-order', a.paraxial),
          focimeter: label('focimeter', a.focimeter),
        },
      }, { mag: display.mag, labels: display.labels, focimeterRay: display.focimeterRay, pencil: this.showPencil });
      panel.render(r);
      // the cross-section and the profile are drawn when their tab is shown
      this.dirty.section = true;
      this.dirty.profile = true;
      this.drawTabs();
      const mapKey = JSON.stringify([r.lens.spec, r.tc.crMm, r.tc.eye, display.mapQuantity]);
      if (mapKey !== this.lastMapKey) {
        this.lastMapKey = mapKey;
        map.request({ spec: r.lens.spec, crMm: r.tc.crMm, eye: r.tc.eye, quantity: display.mapQuantity });
      }
      map.setPoint(r.tc.xMm, r.tc.yMm);
      // a valid case is a step of the history (edits of one field in quick succession are one)
      const c = { ...this.viewCase };
      if (!this.history) this.history = new History<ViewCase>(c, (p, q) => caseToQuery(p) === caseToQuery(q));
      else this.history.record(c, field);
    } else this.showInvalid(out.field, out.message);
    this.syncUndo(this.history?.canUndo ?? false, this.history?.canRedo ?? false);
    this.mag.hidden = display.mag === 1;
    this.mag.textContent = `Deviations drawn ×${display.mag}, not to scale`;
    this.updateBadge();
    this.writeUrl();
    this.counters.lastUpdateMs = performance.now() - t0;
    this.counters.updates++;
  }

  /** A refused value: its message at its field, the last valid lens kept on screen, stale. */
  private showInvalid(field: ViewField | null, message: string): void {
    this.controls.showError(field, message);
    this.stale.hidden = false;
    this.stale.textContent = invalidInputText(message, !!this.last, 'lens');
    if (this.last) {
      this.panel.setStale(message);
      this.scene.markInvalid();
    } else this.panel.setEmpty(message);
    this.map.setStale(true);
  }

  private updateBadge(): void {
    const isDemo = caseToQuery(this.viewCase) === caseToQuery(DEMO_CASE);
    const { host, kind, desc } = this.o.badge;
    kind.textContent = isDemo ? DEMO_TITLE : 'Your case';
    kind.classList.toggle('own', !isDemo);
    desc.textContent = isDemo ? DEMO_DESCRIPTION : 'Edited from the controls; the link in the address bar reproduces it.';
    host.title = isDemo ? DEMO_DESCRIPTION : '';
  }

  /** The address bar follows the case, a moment after the last change (replaceState is not free). */
  private writeUrl(): void {
    if (this.urlTimer) return;
    this.urlTimer = window.setTimeout(() => this.writeUrlNow(), 120);
  }

  writeUrlNow(): void {
    if (this.urlTimer) window.clearTimeout(this.urlTimer);
    this.urlTimer = 0;
    const q = caseToQuery(this.viewCase, this.display);
    this.o.onQuery?.(q);
    if (location.search.slice(1) !== q) history.replaceState(null, '', `${location.pathname}?${q}`);
  }

  copyLink(): void {
    this.writeUrlNow();
    copyLink(location.href, 'this case', this.o.toast);
  }

  /** What the end-to-end tests and the browser benchmark read (nothing else uses it). */
  hook() {
    const self = this;
    const { scene, map, counters } = this;
    return {
      get updates() { return counters.updates; },
      get lastUpdateMs() { return counters.lastUpdateMs; },
      memory: () => ({ ...scene.viewer.renderer.info.memory }),
      frames: () => scene.viewer.frames,
      renderNow: () => scene.viewer.renderNow(),
      /** dispose and recreate the scene's objects n times, rendering after each */
      rebuildScene: (n: number) => {
        for (let i = 0; i < n; i++) {
          scene.rebuildContent();
          scene.viewer.renderNow();
        }
      },
      handlePosition: () => scene.handleClientPosition(),
      viewCase: () => self.getCase(),
      canUndo: () => self.history?.canUndo ?? false,
      valid: () => self.stale.hidden,
      mapDrawn: () => map.drawn,
      powerMapsDrawn: () => map.powerDrawn,
      /** request the current map again and resolve with its round trip (post to drawn), ms */
      mapRoundTrip: () => new Promise<{ roundTripMs: number; workerMs: number }>((resolve) => {
        const r = self.last;
        if (!r) throw new Error('no valid case');
        // the prism map alone: the figure bench:browser reports (the power maps follow separately)
        const id = map.request({ spec: r.lens.spec, crMm: r.tc.crMm, eye: r.tc.eye, quantity: self.display.mapQuantity }, false);
        const prev = map.onResult;
        map.onResult = (rid, rt, wm) => {
          if (rid !== id) return;
          map.onResult = prev;
          resolve({ roundTripMs: rt, workerMs: wm });
        };
      }),
    };
  }
}
