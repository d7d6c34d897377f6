/**
 * The command line's flag name for each lens field. Messages about a lens family name the
 * field by its flag wherever the same table is made (the CLI, and the app's batch export,
 * which prints the command that makes the same table).
 */
export const LENS_FLAGS = {
  sphere: 'sphere', cyl: 'cyl', axis: 'axis', index: 'index', material: 'material', abbe: 'abbe',
  front: 'front', base: 'base', 'tool-index': 'toolIndex', 'front-rule': 'frontRule', ct: 'ct',
  'min-edge': 'minEdge', 'min-ct': 'minCt', diameter: 'diameter', 'front-k': 'frontK', 'back-k': 'backK',
  'cyl-on': 'cylOn', toric: 'toric', cr: 'cr', eye: 'eye',
} as const;

/** Flag name of a field key, for error messages. */
export function flagOf(key: string): string {
  for (const [flag, k] of Object.entries(LENS_FLAGS)) if (k === key) return `--${flag}`;
  return `--${key}`;
}
