/**
 * Errors and per-ray status codes. Inside the engine a ray that misses a surface or is
 * totally internally reflected is a normal outcome (a status); only a caller's misuse or an
 * impossible lens throws, with a message that names the value and the reason.
 */

export const RayStatus = {
  ok: 0,
  /** the ray misses a surface (or the surface does not exist there) */
  miss: 1,
  /** total internal reflection */
  tir: 2,
  /** the lens has no thickness there (surfaces cross), or the path runs backwards */
  geometry: 3,
  /** the point lies beyond the lens edge (a diameter was given) */
  beyondEdge: 4,
} as const;
export type RayStatus = (typeof RayStatus)[keyof typeof RayStatus];

/** Name used in reports and JSON for each status. */
export const FAILURE_NAMES = ['ok', 'miss', 'tir', 'geometry', 'edge'] as const;
export type FailureName = Exclude<(typeof FAILURE_NAMES)[number], 'ok'>;

const FAILURE_MESSAGES: Record<FailureName, string> = {
  miss: 'the line of sight misses a lens surface (the surface does not extend that far)',
  tir: 'total internal reflection inside the lens: no ray leaves along this line of sight',
  geometry: 'the lens has no thickness at this point (front and back surfaces cross)',
  edge: 'the line of sight falls outside the lens diameter (at the visual point or where it leaves the front surface)',
};

export function failureMessage(status: RayStatus): string {
  return status === RayStatus.ok ? 'ok' : FAILURE_MESSAGES[FAILURE_NAMES[status] as FailureName];
}

/** A lens or input that cannot exist; the message says which value and why. */
export class OpticsError extends Error {
  constructor(
    message: string,
    /** the input the message is about, e.g. 'ct' or 'front' */
    readonly field?: string,
  ) {
    super(message);
    this.name = 'OpticsError';
  }
}
