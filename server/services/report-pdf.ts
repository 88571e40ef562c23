/**
 * Draws the release report (content from server/services/report.ts) as an A4 PDF with pdfkit and
 * the fonts shipped in assets/fonts (IBM Plex Sans, SIL OFL): facts, spec and limits,
 * counts and power classes, sign-off, the high-voltage caution, the Pmax and FF histograms with
 * the limits drawn over them, flags, and the device table (its header repeated on each page).
 */
import path from 'node:path';
import PDFDocument from 'pdfkit';
import { reasonInWords } from '@/lib/quality/report-model';
import type { Histogram, ReportDevice } from '@/lib/quality/report-model';
import type { Caution } from '@/lib/strings/cautions';
import { formatValue } from '@/lib/vocabulary';

const FONTS = path.resolve(__dirname, '..', '..', 'assets', 'fonts');
const INK = '#1d2733';
const MUTED = '#5b6775';
const FAIL = '#b3261e';
const BAR = '#4a6fa5';

export type ReportContent = {
  batch: { name: string; lot: string | null; line: string | null; product_type: string | null; supplier: string | null; batch_date: string | null; cells: number | null; state: string };
  release: { revision: number; comment: string | null; csv_sha256: string } | null;
  spec: { name: string; version: number; limits: string[]; fail_flags: string[]; /** What each power class means, in words (empty: no classes). */ power_classes: string[] };
  counts: { total: number; pass: number; fail: number; outliers: number };
  powerClasses: { label: string; count: number }[];
  devices: ReportDevice[];
  histograms: Histogram[];
  flags: { code: string; message: string; count: number }[];
  submitted: { name: string; at: Date } | null;
  released: { name: string; at: Date } | null;
  caution: Caution;
  madeAt: Date;
};

const STATE_WORDS: Record<string, string> = { open: 'open', in_review: 'in review', on_hold: 'on hold', released: 'released' };
const when = (d: Date) => `${d.toISOString().slice(0, 16).replace('T', ' ')} UTC`;

type Doc = InstanceType<typeof PDFDocument>;

function heading(doc: Doc, text: string) {
  if (doc.y > doc.page.height - 140) doc.addPage();
  doc.moveDown(0.8).font('bold').fontSize(12).fillColor(INK).text(text, doc.page.margins.left).moveDown(0.3);
  doc.font('regular').fontSize(9.5);
}

function facts(doc: Doc, rows: [string, string][]) {
  const x = doc.page.margins.left;
  for (const [k, v] of rows) {
    const y = doc.y;
    doc.font('medium').fillColor(MUTED).text(k, x, y, { width: 130 });
    doc.font('regular').fillColor(INK).text(v, x + 135, y, { width: doc.page.width - doc.page.margins.right - x - 135 });
  }
}

/** One histogram in a box at (x, y): bars, the axis with its ends, the limits as red lines. */
function drawHistogram(doc: Doc, h: Histogram, x: number, y: number, w: number, ht: number) {
  doc.font('medium').fontSize(9).fillColor(INK).text(h.title, x, y, { width: w });
  const top = y + 16;
  const plotH = ht - 44;
  if (!h.counts.length) {
    doc.font('regular').fillColor(MUTED).text('No device has this value.', x, top + 10, { width: w });
    return;
  }
  const lo = h.edges[0];
  const hi = h.edges[h.edges.length - 1];
  const sx = (v: number) => x + ((v - lo) / (hi - lo)) * w;
  const most = Math.max(1, ...h.counts);
  h.counts.forEach((c, k) => {
    if (!c) return;
    const bh = (c / most) * plotH;
    doc.rect(sx(h.edges[k]) + 0.5, top + plotH - bh, Math.max(0.5, sx(h.edges[k + 1]) - sx(h.edges[k]) - 1), bh).fill(BAR);
  });
  doc.moveTo(x, top + plotH).lineTo(x + w, top + plotH).lineWidth(0.6).stroke(INK);
  const digits = h.key === 'ff' ? 1 : 1;
  doc.font('mono').fontSize(7.5).fillColor(MUTED);
  doc.text(lo.toFixed(digits), x, top + plotH + 3, { width: 60 });
  doc.text(hi.toFixed(digits), x + w - 60, top + plotH + 3, { width: 60, align: 'right' });
  doc.text(`highest bar: ${most} device${most === 1 ? '' : 's'}`, x + w / 2 - 50, top + plotH + 3, { width: 100, align: 'center' });
  for (const [label, v] of [['min', h.min], ['max', h.max]] as const) {
    if (v === null) continue;
    doc.moveTo(sx(v), top - 2).lineTo(sx(v), top + plotH).lineWidth(1.2).dash(3, { space: 2 }).stroke(FAIL).undash();
    doc.font('medium').fontSize(7.5).fillColor(FAIL).text(`${label} ${v.toFixed(digits)}`, Math.min(sx(v) + 2, x + w - 50), top - 2, { width: 50 });
  }
  doc.font('regular').fontSize(7.5).fillColor(MUTED).text(h.missing ? `${h.missing} device(s) without a value are not drawn.` : ' ', x, top + plotH + 14, { width: w });
}

const COLS = [
  { title: 'Device', w: 92 },
  { title: 'Result', w: 38 },
  { title: 'Class', w: 46 },
  { title: 'Pmax', w: 56 },
  { title: 'FF', w: 42 },
  { title: 'Reasons', w: 0 },
];

function tableHeader(doc: Doc) {
  const x0 = doc.page.margins.left;
  const y = doc.y;
  let x = x0;
  doc.font('bold').fontSize(8.5).fillColor(INK);
  for (const c of COLS) {
    const w = c.w || doc.page.width - doc.page.margins.right - x;
    doc.text(c.title, x, y, { width: w - 4 });
    x += w;
  }
  doc.moveTo(x0, doc.y + 2).lineTo(doc.page.width - doc.page.margins.right, doc.y + 2).lineWidth(0.5).stroke(MUTED);
  doc.y += 5;
}

function deviceTable(doc: Doc, devices: ReportDevice[]) {
  tableHeader(doc);
  const x0 = doc.page.margins.left;
  const reasonsW = doc.page.width - doc.page.margins.right - x0 - COLS.slice(0, 5).reduce((s, c) => s + c.w, 0) - 4;
  for (const d of devices) {
    const reasons = d.reasons.length ? d.reasons.map(reasonInWords).join('; ') : '—';
    doc.font('regular').fontSize(8);
    const rowH = Math.max(11, doc.heightOfString(reasons, { width: reasonsW }) + 2);
    if (doc.y + rowH > doc.page.height - doc.page.margins.bottom - 14) {
      doc.addPage();
      tableHeader(doc);
    }
    const y = doc.y;
    const cells = [d.device_id, d.result === 'pass' ? 'pass' : 'FAIL', d.power_class ?? '—', formatValue('pmp_w', d.pmp_w), formatValue('ff', d.ff)];
    let x = x0;
    cells.forEach((t, k) => {
      doc.font(k === 0 || k >= 3 ? 'mono' : 'regular').fontSize(8).fillColor(k === 1 && d.result === 'fail' ? FAIL : INK).text(t, x, y, { width: COLS[k].w - 4, lineBreak: false, ellipsis: true });
      x += COLS[k].w;
    });
    doc.font('regular').fontSize(8).fillColor(d.result === 'fail' ? FAIL : MUTED).text(reasons, x, y, { width: reasonsW });
    doc.y = y + rowH;
  }
}

/** The report as PDF bytes. */
export function renderReportPdf(r: ReportContent): Promise<Buffer> {
  const doc = new PDFDocument({ size: 'A4', margins: { top: 48, bottom: 48, left: 48, right: 48 }, bufferPages: true, info: { Title: `Release report: ${r.batch.name}`, Author: 'Quasilevel', CreationDate: r.madeAt } });
  doc.registerFont('regular', path.join(FONTS, 'IBMPlexSans_400Regular.ttf'));
  doc.registerFont('medium', path.join(FONTS, 'IBMPlexSans_500Medium.ttf'));
  doc.registerFont('bold', path.join(FONTS, 'IBMPlexSans_600SemiBold.ttf')); // the heaviest face shipped
  // The shipped IBM Plex Mono files fail in pdfkit's font reader (fontkit reads past a glyph
  // table on spaces and punctuation), so figures use Plex Sans too.
  doc.registerFont('mono', path.join(FONTS, 'IBMPlexSans_400Regular.ttf'));
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });

  const left = doc.page.margins.left;
  const width = doc.page.width - left - doc.page.margins.right;
  doc.font('bold').fontSize(18).fillColor(INK).text(`Release report: ${r.batch.name}`);
  doc
    .font('regular')
    .fontSize(10)
    .fillColor(r.release ? INK : FAIL)
    .text(r.release ? `Released, revision ${r.release.revision}. Built from the frozen release record.` : `Not released: the batch is ${STATE_WORDS[r.batch.state] ?? r.batch.state}. Judged now; a later release may differ.`);

  heading(doc, 'Batch');
  facts(doc, [
    ['Name', r.batch.name],
    ['Lot', r.batch.lot ?? '—'],
    ['Line', r.batch.line ?? '—'],
    ['Product type', r.batch.product_type ?? '—'],
    ['Supplier', r.batch.supplier ?? '—'],
    ['Date', r.batch.batch_date ?? '—'],
    ['Cells in series', r.batch.cells === null ? '—' : String(r.batch.cells)],
    ['State', STATE_WORDS[r.batch.state] ?? r.batch.state],
  ]);

  heading(doc, `Acceptance spec: ${r.spec.name}, version ${r.spec.version}`);
  if (!r.spec.limits.length) doc.text('No limits: every measured device passes unless a flag fails it.');
  for (const l of r.spec.limits) doc.text(`• ${l}`);
  if (r.spec.fail_flags.length) doc.text(`• Fails on the flags: ${r.spec.fail_flags.join(', ')}`);
  if (r.spec.power_classes.length) {
    doc.moveDown(0.3).font('bold').text('Power classes').font('regular');
    for (const l of r.spec.power_classes) doc.text(`• ${l}`);
  }

  heading(doc, 'Counts');
  facts(doc, [
    ['Devices', String(r.counts.total)],
    ['Pass', String(r.counts.pass)],
    ['Fail', String(r.counts.fail)],
    ['Outliers', String(r.counts.outliers)],
    ['Power classes', r.powerClasses.map((p) => `${p.label}: ${p.count}`).join(', ') || '—'],
  ]);

  heading(doc, 'Sign-off');
  facts(doc, [
    ['Submitted by', r.submitted ? `${r.submitted.name}, ${when(r.submitted.at)}` : 'not submitted'],
    ['Released by', r.released ? `${r.released.name}, ${when(r.released.at)}` : 'not released'],
    ...(r.release?.comment ? ([['Release comment', r.release.comment]] as [string, string][]) : []),
    ...(r.release ? ([['Pass/fail CSV SHA-256', r.release.csv_sha256]] as [string, string][]) : []),
  ]);

  // The caution, boxed.
  heading(doc, r.caution.title);
  const boxTop = doc.y;
  doc.font('regular').fontSize(8.5).fillColor(INK);
  for (const b of r.caution.bullets) doc.text(`• ${b}`, left + 8, doc.y, { width: width - 16 });
  doc.rect(left, boxTop - 4, width, doc.y - boxTop + 8).lineWidth(1).stroke(FAIL);
  doc.y += 8;

  heading(doc, 'Distributions against the limits');
  if (doc.y > doc.page.height - 200) doc.addPage();
  const hy = doc.y;
  const hw = (width - 24) / 2;
  r.histograms.forEach((h, k) => drawHistogram(doc, h, left + k * (hw + 24), hy, hw, 130));
  doc.y = hy + 136;
  doc.x = left;

  heading(doc, 'Flags');
  if (!r.flags.length) doc.text('No curve raised a flag.');
  for (const f of r.flags) doc.text(`• ${f.code} on ${f.count} curve${f.count === 1 ? '' : 's'}: ${f.message}`);

  doc.addPage();
  doc.font('bold').fontSize(12).fillColor(INK).text(`Devices (${r.devices.length})`).moveDown(0.3);
  deviceTable(doc, r.devices);

  const pages = doc.bufferedPageRange();
  for (let k = 0; k < pages.count; k++) {
    doc.switchToPage(pages.start + k);
    const bottom = doc.page.margins.bottom;
    doc.page.margins.bottom = 0;
    doc
      .font('regular')
      .fontSize(7.5)
      .fillColor(MUTED)
      .text(`Quasilevel release report · ${r.batch.name} · made ${when(r.madeAt)} · page ${k + 1} of ${pages.count} · High voltage DC: see the caution on page 1.`, left, doc.page.height - 30, { width, lineBreak: false });
    doc.page.margins.bottom = bottom;
  }
  doc.end();
  return done;
}
