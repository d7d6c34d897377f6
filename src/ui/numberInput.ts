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
