/**
 * Comparing batches of different kinds: single cells against modules, or modules with different
 * numbers of cells in series. A module of N equal cells in series has N times a cell's voltage,
 * power and series/shunt resistance at the same current (the single-diode model's N·n·Vt and
 * the series sum of the resistances; docs/domain.md), so those quantities are compared **per
 * cell** (value ÷ cells in series). Currents do not depend on the cells in series (they depend
 * on the cell size and on strings in parallel, which no file states), and FF, efficiency, the
 * per-cell ideality n and J0 per area do not either: those are compared as measured, with a
 * sentence saying so. When the kinds differ and a device does not say how many cells it has in
 * series, a series quantity cannot be put per cell: the t-test is refused with the reason.
 *
 * Pure: the server (server/services/compare.ts) applies it, the screens show its words.
 */
import type { Description } from '@/lib/quality/describe';
import { describe as describeValues } from '@/lib/quality/describe';
import type { ParamKey } from '@/lib/quality/params';
import { labelOf } from '@/lib/vocabulary';

/** Quantities that add up over the cells in series: compared per cell between different kinds. */
export const SERIES_KEYS: ReadonlySet<ParamKey> = new Set<ParamKey>(['voc_v', 'vmp_v', 'pmp_w', 'stc_pmp_w', 'rs_ohm', 'rsh_ohm', 'rs0_ohm', 'rsh0_ohm']);
/** Currents: set by the cell size and the strings in parallel, not by the cells in series. */
export const CURRENT_KEYS: ReadonlySet<ParamKey> = new Set<ParamKey>(['isc_a', 'imp_a', 'iph_a', 'i0_a', 'rmse_a']);

/** What one batch holds: how many devices, their distinct cell counts, how many do not say. */
export type BatchKind = {
  batch_id: string;
  /** Distinct cells-in-series counts of the devices that give one, ascending. */
  cells: number[];
  /** Devices without a cell count. */
  without_cells: number;
  /** In words: "single cells", "60-cell modules", "modules of 36 to 72 cells". */
  label: string;
};

/** How the chosen parameter is compared across the batches. */
export type KindBasis = 'as_measured' | 'per_cell' | 'refused';

export type KindComparison = {
  batches: BatchKind[];
  /** True when the batches' devices have different numbers of cells in series. */
  mixed: boolean;
  basis: KindBasis;
  /** What the screen says about the kinds and the basis; null when there is nothing to say. */
  note: string | null;
  /** Statistics of the parameter per cell, per batch id, when the basis is per cell. */
  per_cell_stats: Record<string, Description | null> | null;
};

/** "single cells", "60-cell modules", "modules of 36 to 72 cells", with the devices that do not say. */
export function kindLabel(cells: readonly number[], withoutCells: number, devices: number): string {
  let known: string;
  if (cells.length === 0) known = '';
  else if (cells.length === 1) known = cells[0] === 1 ? 'single cells' : `${cells[0]}-cell modules`;
  else if (cells[0] === 1) known = `cells and modules of up to ${cells[cells.length - 1]} cells`;
  else known = `modules of ${cells[0]} to ${cells[cells.length - 1]} cells`;
  if (!withoutCells) return known;
  const none = withoutCells === devices ? 'cells in series not given' : `${withoutCells} of ${devices} devices without a cell count`;
  return known ? `${known}, ${none}` : none;
}

/** The kind of one batch from its devices' cell counts (null: the device does not say). */
export function batchKind(batchId: string, devices: readonly { cells: number | null }[]): BatchKind {
  const set = new Set<number>();
  let without = 0;
  for (const d of devices) {
    if (typeof d.cells === 'number' && Number.isInteger(d.cells) && d.cells > 0) set.add(d.cells);
    else without += 1;
  }
  const cells = [...set].sort((a, b) => a - b);
  return { batch_id: batchId, cells, without_cells: without, label: kindLabel(cells, without, devices.length) };
}

/** The values of `param` per cell (÷ cells in series); devices without a cell count or value are left out. */
export function perCellValues(devices: readonly { cells: number | null; values: Partial<Record<string, number | null>> }[], param: ParamKey): number[] {
  const out: number[] = [];
  for (const d of devices) {
    const v = d.values[param];
    if (typeof v === 'number' && Number.isFinite(v) && typeof d.cells === 'number' && d.cells > 0) out.push(v / d.cells);
  }
  return out;
}

const capital = (text: string) => text.charAt(0).toUpperCase() + text.slice(1);

/** "Voc per cell": the label the per-cell figures carry. */
export function perCellLabel(param: ParamKey): string {
  return `${labelOf(param)} per cell`;
}

/**
 * How `param` is compared across these batches, with the words the screen shows. `names` gives
 * each batch id its name; `devices` each batch id its devices (for the per-cell statistics).
 */
export function compareKinds(
  kinds: readonly BatchKind[],
  param: ParamKey,
  names: ReadonlyMap<string, string>,
  devices: ReadonlyMap<string, readonly { cells: number | null; values: Partial<Record<string, number | null>> }[]>,
): KindComparison {
  const known = new Set(kinds.flatMap((k) => k.cells));
  const mixed = known.size > 1;
  const label = labelOf(param);
  const name = (id: string) => `“${names.get(id) ?? id}”`;
  const listing = kinds.map((k) => `${name(k.batch_id)}: ${k.label}`).join('; ');
  const base = { batches: [...kinds], mixed, per_cell_stats: null };
  const silent = kinds.filter((k) => k.without_cells > 0);
  const totalSilent = silent.reduce((s, k) => s + k.without_cells, 0);
  const which = silent.map((k) => `${k.without_cells} device${k.without_cells === 1 ? '' : 's'} of ${name(k.batch_id)}`).join(' and ');
  const doNotSay = `${which} ${totalSilent === 1 ? 'does' : 'do'} not say how many cells are in series`;
  const fix = 'Give the cells in series in the files, as the batch’s default before uploading, or in a refit.';
  if (!mixed) {
    if (!silent.length || kinds.length < 2) return { ...base, basis: 'as_measured', note: null };
    if (known.size === 0) {
      return { ...base, basis: 'as_measured', note: `None of these batches says how many cells its devices have in series; compared as measured, as if they were of one kind.` };
    }
    // The files that say agree on one kind; the others might be of another (a lot of cells
    // against modules): a figure that adds up over the cells cannot be trusted as measured.
    const lead = `${doNotSay}, so it cannot be told whether they are ${kindLabel([...known], 0, 1)} like the rest.`;
    if (SERIES_KEYS.has(param)) {
      return { ...base, basis: 'refused', note: `${capital(lead)} ${label} adds up over the cells in series: Welch’s t-test is not run on it. ${fix}` };
    }
    return { ...base, basis: 'as_measured', note: `${capital(lead)} ${label} does not add up over the cells in series, so it is compared as measured.` };
  }
  const lead = `These batches hold different kinds of devices (${listing}).`;
  if (SERIES_KEYS.has(param)) {
    if (silent.length) {
      return {
        ...base,
        basis: 'refused',
        note: `${lead} ${label} adds up over the cells in series, so it can only be compared per cell, but ${doNotSay}: Welch’s t-test is not run on ${label}. ${fix}`,
      };
    }
    const per_cell_stats: Record<string, Description | null> = {};
    for (const k of kinds) {
      const v = perCellValues(devices.get(k.batch_id) ?? [], param);
      per_cell_stats[k.batch_id] = v.length ? describeValues(v) : null;
    }
    return {
      ...base,
      basis: 'per_cell',
      note: `${lead} ${label} adds up over the cells in series, so it is compared per cell: ${label} ÷ cells in series.`,
      per_cell_stats,
    };
  }
  if (CURRENT_KEYS.has(param)) {
    return {
      ...base,
      basis: 'as_measured',
      note: `${lead} ${label} does not depend on the cells in series, so it is compared as measured; it does depend on the cell size and on strings in parallel, so a difference may come from the design rather than the process.`,
    };
  }
  return { ...base, basis: 'as_measured', note: `${lead} ${label} does not depend on the number of cells in series, so it is compared as measured.` };
}
