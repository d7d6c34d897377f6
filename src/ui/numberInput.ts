/** Keyboard stepping for the number fields of both workspaces' controls. */
import { type Quantity, readNumber } from '../case/input.ts';

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
      v = readNumber(spec.label, input.value, spec.quantity);
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
