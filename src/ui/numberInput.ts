/** Keyboard stepping for the number fields of both workspaces' controls. */
import { InputError, type Quantity, readNumber } from '../case/input.ts';

export interface StepSpec {
  label: string;
  quantity: Quantity;
  step: number;
  decimals: number;
}

/** A value written with the step's decimals, without a negative zero. */
export function formatStep(v: number, spec: { step: number; decimals: number }): string {
  const s = v.toFixed(spec.decimals);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
}

/** Up/Down arrows step a valid value by spec.step (ten steps with Shift); others are left alone. */
export function enableArrowSteps(input: HTMLInputElement, spec: StepSpec, setValue: (text: string) => void): void {
  input.setAttribute('inputmode', 'decimal');
  input.addEventListener('keydown', (e) => {
    if (e.key !== 'ArrowUp' && e.key !== 'ArrowDown') return;
    let v: number;
    try {
      v = readTypedNumber(spec.label, input.value, spec.quantity);
    } catch {
      return;
    }
    e.preventDefault();
    const d = (e.key === 'ArrowUp' ? 1 : -1) * spec.step * (e.shiftKey ? 10 : 1);
    setValue(formatStep(Math.round((v + d) / spec.step) * spec.step, spec));
  });
}

/** The hidden message slot under a control, where a refused value's reason is shown. */
export function errorSlot(after: HTMLElement, id: string): HTMLDivElement {
  const el = document.createElement('div');
  el.className = 'field-error';
  el.id = id;
  el.setAttribute('role', 'alert');
  el.hidden = true;
  after.after(el);
  return el;
}

/** What showFieldError needs of a control: its element and its folder. */
interface FieldControl {
  domElement: HTMLElement;
  parent: { open(): unknown };
}

/**
 * Show one refused value's message under its field, outlined and marked invalid, and open its
 * folder so that the message can be seen; clear every other message. `field` or `message`
 * null clears all.
 */
export function showFieldError<K>(
  errorEls: ReadonlyMap<K, HTMLElement>, controls: ReadonlyMap<K, FieldControl>, field: K | null, message: string | null,
): void {
  for (const [k, el] of errorEls) {
    el.hidden = true;
    el.textContent = '';
    const d = controls.get(k)?.domElement;
    d?.classList.remove('invalid');
    d?.querySelector('input')?.removeAttribute('aria-invalid');
  }
  if (!message || field === null) return;
  const ctl = controls.get(field);
  const el = errorEls.get(field);
  if (!ctl || !el) return;
  ctl.domElement.classList.add('invalid');
  ctl.domElement.querySelector('input')?.setAttribute('aria-invalid', 'true');
  el.textContent = message;
  el.hidden = false;
  ctl.parent.open();
}

/**
 * The app's one reading of a decimal comma (docs/visualiser.md, "Decimal comma"): a single
 * number typed with a comma as its decimal mark ("4,5", "-0,25", "2,5 mm") is the same number
 * with a point; text with a comma and a point ("1,234.5", "1.234,5") or with more than one
 * comma ("4,5,6") is refused with a hint naming the field, never guessed. Text without a
 * comma is returned as it is. Only the app calls this: on the command line a comma separates
 * list items (docs/cli.md).
 */
export function decimalPoint(field: string, raw: string): string {
  const commas = raw.split(',').length - 1;
  if (commas === 0) return raw;
  if (commas > 1) {
    throw new InputError(field, `'${clipText(raw)}' has more than one comma; type one number, with a point or a comma as its decimal mark (e.g. 4.5 or 4,5)`);
  }
  if (raw.includes('.')) {
    throw new InputError(field, `'${clipText(raw)}' has both a comma and a point; use one decimal mark and no thousands separator (e.g. 1234.5)`);
  }
  return raw.replace(',', '.');
}

/** readNumber (src/case) of a typed value, after decimalPoint. */
export function readTypedNumber(field: string, raw: string, quantity: Quantity): number {
  return readNumber(field, decimalPoint(field, raw), quantity);
}

function clipText(s: string): string {
  const t = s.trim();
  return t.length > 24 ? `${t.slice(0, 24)}…` : t;
}

/**
 * For a text field that holds one number: a decimal comma it can read (decimalPoint) becomes
 * a point in the model and in the field at once, so that what is shown is what is read (the
 * caret stays where it was). Text decimalPoint refuses is left as typed; the reader then
 * refuses it with the hint.
 */
export function pointInField(model: Record<string, unknown>, key: string, label: string, input: HTMLInputElement): void {
  const raw = model[key];
  if (typeof raw !== 'string' || !raw.includes(',')) return;
  let p: string;
  try {
    p = decimalPoint(label, raw);
  } catch {
    return;
  }
  model[key] = p;
  if (input.value === p) return;
  const focused = document.activeElement === input;
  const a = input.selectionStart, b = input.selectionEnd;
  input.value = p;
  // lil-gui writes the model into the field after its onChange: put the caret back after that
  if (focused && a !== null && b !== null) queueMicrotask(() => input.setSelectionRange(a, b));
}

/** The lens-form fields a form shows for its material, front and thickness modes. */
export function lensFormVisibility(m: { material: string; frontMode: string; thicknessMode: string }): [key: string, shown: boolean][] {
  return [
    ['index', m.material === 'custom'], ['abbe', m.material === 'custom'],
    ['front', m.frontMode === 'true'], ['base', m.frontMode === 'nominal'], ['toolIndex', m.frontMode === 'nominal'],
    ['ct', m.thicknessMode === 'centre'], ['minEdge', m.thicknessMode === 'rule'], ['minCt', m.thicknessMode === 'rule'],
  ];
}

/** A hint paragraph at the end of a control folder (lil-gui's children element), with the app's hint style. */
export function folderHint(folder: { $children: HTMLElement }, text = '', extraClass = ''): HTMLParagraphElement {
  const p = document.createElement('p');
  p.className = extraClass ? `controls-hint ${extraClass}` : 'controls-hint';
  p.textContent = text;
  folder.$children.appendChild(p);
  return p;
}
