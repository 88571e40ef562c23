/**
 * The published reference curves kept in the repository (tests/fixtures/reference-data, see its
 * README for the citation of each file and the best-fit values the tests compare with).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';

/** The folder holding the reference CSVs and their README. */
export const REFERENCE_DATA_DIR = path.resolve(__dirname, '..', 'fixtures', 'reference-data');

/** 57 mm silicon cell at 33 °C, 1000 W/m², one cell (Easwarakhanthan et al. 1986). */
export const REFERENCE_CELL = 'cell-57mm-33C.csv';
/** 36-cell polycrystalline module at 45 °C, 1000 W/m² (Easwarakhanthan et al. 1986). */
export const REFERENCE_MODULE = 'module-36cell-45C.csv';

export type ReferenceFile = typeof REFERENCE_CELL | typeof REFERENCE_MODULE;

/** Absolute path of one reference file. */
export function referencePath(file: ReferenceFile): string {
  return path.join(REFERENCE_DATA_DIR, file);
}

/** The text of one reference file. */
export function readReference(file: ReferenceFile): string {
  return readFileSync(referencePath(file), 'utf8');
}
