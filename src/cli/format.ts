/** Printing helpers for the CLI: the JSON answer shape of docs/cli.md and readable tables. */
import type { Answers, Failure, Prism } from '../api/index.ts';
import type { Answer } from '../optics/index.ts';
import { POWER_QUESTION, demandLine, powerJson, powerLine } from '../case/powerWords.ts';

/** One answer as the engine or the library gives it: a prism, or a failure. */
type AnyAnswer = Answer | Prism | Failure;

function isFailure(a: AnyAnswer): a is Failure {
  return 'failure' in a;
}

export const CAUTION =
  'Decentra is a computation aid. Verify prism on the finished spectacles with a focimeter, and defer to ' +
  'local regulations and licensed professional judgement.';

/** The docs/cli.md ("`--json` output") shape of one answer: the described prism, or the failure. */
export function answerJson(a: AnyAnswer): object {
  // docs/cli.md names three failures; a ray that leaves through the lens edge has no
  // thickness of lens behind its exit point, so it is reported as a geometry failure
  if (isFailure(a)) return { failure: a.failure === 'edge' ? 'geometry' : a.failure, message: a.message };
  return {
    x: a.x, y: a.y, magnitude: a.magnitude, baseAngle: a.baseAngle,
    horizontal: { amount: a.horizontal.amount, base: a.horizontal.base },
    vertical: { amount: a.vertical.amount, base: a.vertical.base },
  };
}

/** The docs/cli.md shape of the four answers at one point (the library's Answers). */
export function fourAnswersJson(r: Answers, input: object): object {
  return {
    eye: r.eye,
    input,
    prentice: answerJson(r.prentice),
    paraxial: answerJson(r.firstOrder),
    exact: { ...answerJson(r.exact), power: powerJson(r.power) },
    focimeter: answerJson(r.focimeter),
    error: r.prenticeError,
  };
}

export function signed(v: number, decimals = 2): string {
  const s = Math.abs(v).toFixed(decimals);
  return Number(s) === 0 ? s : `${v < 0 ? '-' : '+'}${s}`;
}

function component(amount: number, base: string | null, decimals: number): string {
  return base === null ? '0' : `${amount.toFixed(decimals)} Δ ${base}`;
}

/** One row of the readable answer table. */
export function answerCells(a: AnyAnswer, decimals = 3): string[] {
  if (isFailure(a)) return [`no answer: ${a.message}`, '', ''];
  return [
    component(a.horizontal.amount, a.horizontal.base === null ? null : `base ${a.horizontal.base}`, decimals),
    component(a.vertical.amount, a.vertical.base === null ? null : `base ${a.vertical.base}`, decimals),
    `${a.magnitude.toFixed(decimals)} Δ at ${a.baseAngle.toFixed(1)}°`,
  ];
}

/** Left-aligned text table. */
export function table(rows: string[][]): string {
  const widths: number[] = [];
  for (const r of rows) r.forEach((c, i) => (widths[i] = Math.max(widths[i] ?? 0, [...c].length)));
  return rows.map((r) => r.map((c, i) => c + ' '.repeat(widths[i]! - [...c].length)).join('  ').trimEnd()).join('\n');
}

export { csvCell } from '../case/batch.ts';

/** The power beside the prism, for the text answer of `trace` and `near` (docs/method.md). */
export function powerText(r: Answers): string {
  const demand = demandLine(r.power);
  return `${POWER_QUESTION}:\n  ${powerLine(r.power)}${demand ? `\n  ${demand}` : ''}`;
}

/** The readable table of the four answers (and the focimeter's first-order value, if asked). */
export function answersTable(r: Answers, withFirstOrderFocimeter = true): string {
  return table([
    ['answer', 'horizontal', 'vertical', 'resultant'],
    ["Prentice's rule", ...answerCells(r.prentice)],
    ['first-order thick lens', ...answerCells(r.firstOrder)],
    ['exact, line of sight', ...answerCells(r.exact)],
    ['focimeter, exact', ...answerCells(r.focimeter)],
    ...(withFirstOrderFocimeter ? [['focimeter, first order', ...answerCells(r.focimeterFirstOrder)]] : []),
  ]);
}
