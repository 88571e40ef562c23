/** Tick label of a log axis at a power of ten: 1e-15 → "10⁻¹⁵", 1 → "1". */
export function powerOfTenTick(v: number): string {
  const e = Math.round(Math.log10(v));
  if (e === 0) return '1';
  const sup = '⁰¹²³⁴⁵⁶⁷⁸⁹';
  return `10${String(e).replace('-', '⁻').replace(/\d/g, (d) => sup[Number(d)])}`;
}
