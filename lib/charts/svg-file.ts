/**
 * Turning a chart's rendered <svg> markup into a file that stands on its own: an XML
 * declaration, the SVG namespace, a paper-coloured background (the page's colour is not part of
 * the element), a <title>, and the legend drawn under the plot (on screen it is text beside the
 * chart, outside the <svg>). Pure text in, text out; the DOM part is components/chart-download.ts.
 */

const SVG_NS = 'http://www.w3.org/2000/svg';

export type LegendMark = 'dot' | 'line' | 'dash' | 'diamond';
export type LegendItem = { label: string; colour: string; mark: LegendMark };

const ROW_PX = 18;
const FONT_PX = 11;
/** Width of a label guessed at 0.6 em a character: enough to lay out a legend without a DOM. */
const textWidth = (s: string) => s.length * FONT_PX * 0.6;

export const escapeXml = (s: string): string => s.replace(/[<>&"']/g, (c) => ({ '<': '&lt;', '>': '&gt;', '&': '&amp;', '"': '&quot;', "'": '&apos;' })[c] ?? c);

function markSvg(item: LegendItem, x: number, y: number): string {
  const c = escapeXml(item.colour);
  switch (item.mark) {
    case 'dot':
      return `<circle cx="${x + 8}" cy="${y}" r="3" fill="${c}"/>`;
    case 'diamond':
      return `<path d="M${x + 8} ${y - 5}L${x + 13} ${y}L${x + 8} ${y + 5}L${x + 3} ${y}Z" fill="${c}"/>`;
    case 'dash':
      return `<line x1="${x}" y1="${y}" x2="${x + 16}" y2="${y}" stroke="${c}" stroke-width="2" stroke-dasharray="5,3"/>`;
    default:
      return `<line x1="${x}" y1="${y}" x2="${x + 16}" y2="${y}" stroke="${c}" stroke-width="2"/>`;
  }
}

/** The legend as SVG rows that fit `width`, and the height they take. */
export function legendSvg(items: readonly LegendItem[], width: number, ink = '#111A2E'): { svg: string; height: number } {
  if (!items.length) return { svg: '', height: 0 };
  const parts: string[] = [];
  let x = 12;
  let row = 0;
  for (const it of items) {
    const w = 22 + textWidth(it.label) + 14;
    if (x > 12 && x + w > width - 8) {
      row += 1;
      x = 12;
    }
    const y = 12 + row * ROW_PX;
    parts.push(markSvg(it, x, y), `<text x="${x + 22}" y="${y + 4}" font-size="${FONT_PX}" font-family="sans-serif" fill="${escapeXml(ink)}">${escapeXml(it.label)}</text>`);
    x += w;
  }
  return { svg: parts.join(''), height: (row + 1) * ROW_PX + 6 };
}

/**
 * One SVG file from the chart's markup (`XMLSerializer` output of the rendered <svg>), `width` ×
 * `height` px, with an optional title, background and legend under the plot.
 */
export function svgFileText(markup: string, opts: { width: number; height: number; title?: string; background?: string; legend?: readonly LegendItem[] }): string {
  const open = /^\s*<svg\b[^>]*>/i.exec(markup);
  if (!open) throw new Error('not an <svg> element');
  let root = open[0].trim();
  if (!/\sxmlns\s*=/.test(root)) root = root.replace(/^<svg\b/i, `<svg xmlns="${SVG_NS}"`);
  // The plot keeps its own root (viewBox and all) as a nested <svg> placed at the top.
  // Missing attributes go in front of the others, so add them last-first to read x, y, width, height.
  for (const [k, v] of [['height', opts.height], ['width', opts.width], ['y', 0], ['x', 0]] as const) {
    root = new RegExp(`\\s${k}\\s*=`).test(root) ? root.replace(new RegExp(`\\s${k}\\s*=\\s*"[^"]*"`), ` ${k}="${v}"`) : root.replace(/^<svg\b/i, `<svg ${k}="${v}"`);
  }
  // The page's CSS sizing (`style="width: 100%; height: 100%"`) would stretch the nested plot
  // over the legend: its attributes size it instead.
  root = root.replace(/\sstyle\s*=\s*"[^"]*"/, '');
  // The app's fonts are not inside the file: name a generic family after each one.
  const body = markup.trim().slice(open[0].trim().length).replace(/font-family:\s*([^;",]+?)\s*(;|")/g, 'font-family: $1, sans-serif$2');
  const plot = root + body;
  const legend = legendSvg(opts.legend ?? [], opts.width);
  const total = opts.height + legend.height;
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    `<svg xmlns="${SVG_NS}" width="${opts.width}" height="${total}" viewBox="0 0 ${opts.width} ${total}">`,
    opts.title ? `<title>${escapeXml(opts.title)}</title>` : '',
    opts.background ? `<rect x="0" y="0" width="${opts.width}" height="${total}" fill="${escapeXml(opts.background)}"/>` : '',
    plot,
    legend.svg ? `<g transform="translate(0 ${opts.height})">${legend.svg}</g>` : '',
    '</svg>',
    '',
  ]
    .filter((s, k, all) => s !== '' || k === all.length - 1)
    .join('\n');
}

/** A file name from free text (a device id, say): letters, digits, dot, dash and underscore only. */
export function chartFileName(base: string, kind: string, ext: 'svg' | 'png'): string {
  const clean = base.trim().replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^-+|-+$/g, '') || 'chart';
  return `${clean}-${kind}.${ext}`;
}
