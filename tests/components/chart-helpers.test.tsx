/**
 * The pure parts of the charts: domain and axis placement, pixel mapping and the nearest point
 * under the pointer, the readout text, the SVG file and the overlay's colouring.
 */
import { overlayTones } from '@/lib/charts/overlay-tones';
import { domainOf, edgeAxes, inPlot, nearestPoint, paddedRange, toData, toPixel } from '@/lib/charts/plot-frame';
import type { PlotFrame } from '@/lib/charts/plot-frame';
import { ivReadout } from '@/lib/charts/readout';
import { chartFileName, legendSvg, svgFileText } from '@/lib/charts/svg-file';

const PADDING = { top: 10, right: 20, bottom: 40, left: 60 };

describe('paddedRange / domainOf', () => {
  it('widens the data range by the given share of its span on each side (computed by hand)', () => {
    // span 0.6 − (−0.2) = 0.8; 5 % of it is 0.04
    const [lo, hi] = paddedRange([0.1, -0.2, 0.6], 0.05);
    expect(lo).toBeCloseTo(-0.24, 12);
    expect(hi).toBeCloseTo(0.64, 12);
  });

  it('ignores non-finite values and gives a flat or empty series a span', () => {
    expect(paddedRange([2, NaN, 2, Infinity])).toEqual([1.9, 2.1]);
    expect(paddedRange([0, 0])).toEqual([-1, 1]);
    expect(paddedRange([])).toEqual([0, 1]);
  });

  it('takes every series into the domain, so no point (a model past the last measurement) is cut off', () => {
    const d = domainOf([[{ x: 0, y: 1 }, { x: 0.5, y: 0 }], [{ x: 0.6, y: -0.1 }]], { x: 0, y: 0 });
    expect(d).toEqual({ x: [0, 0.6], y: [-0.1, 1] });
  });
});

describe('edgeAxes', () => {
  it('pins the axes to the bottom and left edges of the plot instead of the data origin', () => {
    const a = edgeAxes(PADDING);
    expect(a.x).toEqual({ crossAxis: false, offsetY: 40 });
    expect(a.y).toEqual({ crossAxis: false, offsetX: 60 });
  });
});

describe('pixel mapping and the nearest point', () => {
  // A 380 × 250 chart: plot area x 60…360 (300 px), y 10…210 (200 px).
  const frame: PlotFrame = { width: 380, height: 250, padding: PADDING, domain: { x: [0, 0.6], y: [0, 1] } };

  it('maps the domain corners onto the plot-area corners and back (computed by hand)', () => {
    expect(toPixel(frame, { x: 0, y: 0 })).toEqual({ px: 60, py: 210 });
    expect(toPixel(frame, { x: 0.6, y: 1 })).toEqual({ px: 360, py: 10 });
    const back = toData(frame, 210, 110);
    expect(back.x).toBeCloseTo(0.3, 12);
    expect(back.y).toBeCloseTo(0.5, 12);
  });

  it('knows the plotting area, with some slack', () => {
    expect(inPlot(frame, 200, 100)).toBe(true);
    expect(inPlot(frame, 55, 100)).toBe(false);
    expect(inPlot(frame, 55, 100, 10)).toBe(true);
    expect(inPlot(frame, 200, 240, 10)).toBe(false);
  });

  it('measures on screen: a point far in volts but close in pixels wins over one close in volts only', () => {
    // In data units b is nearer in x to the pointer's 0.3 V, but 0.8 A away (160 px);
    // a is 0.05 V away (25 px) at the same current.
    const pts = [{ x: 0.35, y: 0.5 }, { x: 0.3, y: -0.3 }];
    const hit = nearestPoint(frame, pts, toPixel(frame, { x: 0.3, y: 0.5 }).px, toPixel(frame, { x: 0.3, y: 0.5 }).py);
    expect(hit?.index).toBe(0);
    expect(hit?.distance_px).toBeCloseTo(25, 9);
  });

  it('skips non-finite points and answers null without any', () => {
    expect(nearestPoint(frame, [{ x: NaN, y: 0 }, { x: 0.1, y: 0.1 }], 0, 0)?.index).toBe(1);
    expect(nearestPoint(frame, [], 100, 100)).toBeNull();
  });
});

describe('ivReadout', () => {
  it('gives V, I and P = V·I with units, 4 significant figures (P computed by hand: 0.452 × 0.69 = 0.31188)', () => {
    expect(ivReadout(0.452, 0.69)).toBe('V = 0.4520 V · I = 0.6900 A · P = 0.3119 W');
  });
  it('names the device when given one, and writes tiny or huge values with an exponent', () => {
    // P = 36.1 × 1.234e-5 = 4.45474e-4 W (by hand), still above the 1e-4 where exponents start.
    expect(ivReadout(36.1, 0.00001234, 'KF-M60-0007')).toBe('KF-M60-0007: V = 36.10 V · I = 1.234e-5 A · P = 0.0004455 W');
    expect(ivReadout(0, 9.5)).toBe('V = 0 V · I = 9.500 A · P = 0 W');
  });
});

describe('svgFileText', () => {
  const rendered =
    '<svg width="300" height="200" viewBox="0 0 300 200" style="width: 100%; height: 100%;"><g><path d="M0 0L10 10" stroke-width="2"/><text>Voltage (V)</text><tspan style="font-family: PlexMono; font-size: 10px;">0.1</tspan></g></svg>';

  it('makes a standalone file: declaration, namespace, title, background, the plot nested at its size', () => {
    const text = svgFileText(rendered, { width: 300, height: 200, title: 'KF <1> & co', background: '#FFFFFF' });
    expect(text.startsWith('<?xml version="1.0" encoding="UTF-8"?>\n<svg xmlns="http://www.w3.org/2000/svg" width="300" height="200" viewBox="0 0 300 200">')).toBe(true);
    expect(text).toContain('<title>KF &lt;1&gt; &amp; co</title>');
    expect(text).toContain('<rect x="0" y="0" width="300" height="200" fill="#FFFFFF"/>');
    // The plot keeps its viewBox and content; stroke-width is not mistaken for the width attribute.
    expect(text).toContain('<svg x="0" y="0" xmlns="http://www.w3.org/2000/svg" width="300" height="200" viewBox="0 0 300 200"');
    expect(text).toContain('<path d="M0 0L10 10" stroke-width="2"/><text>Voltage (V)</text>');
    // The page's 100 % sizing is dropped from the nested plot; app fonts get a generic fallback.
    expect(text).not.toContain('width: 100%');
    expect(text).toContain('style="font-family: PlexMono, sans-serif; font-size: 10px;"');
    // Well formed: as many <svg as </svg>.
    expect(text.match(/<svg\b/g)?.length).toBe(text.match(/<\/svg>/g)?.length);
  });

  it('draws the legend under the plot and makes the file that much taller', () => {
    const legend = [
      { label: 'measured', colour: '#111A2E', mark: 'dot' as const },
      { label: 'single diode', colour: '#0F7F74', mark: 'line' as const },
    ];
    const strip = legendSvg(legend, 300);
    expect(strip.height).toBeGreaterThan(0);
    const text = svgFileText(rendered, { width: 300, height: 200, legend });
    expect(text).toContain(`height="${200 + strip.height}"`);
    expect(text).toContain('<g transform="translate(0 200)">');
    expect(text).toContain('stroke="#0F7F74"');
    expect(text).toContain('>single diode</text>');
  });

  it('wraps a legend that does not fit the width onto more rows', () => {
    const many = Array.from({ length: 6 }, (_, k) => ({ label: `series number ${k}`, colour: '#000', mark: 'line' as const }));
    expect(legendSvg(many, 200).height).toBeGreaterThan(legendSvg(many.slice(0, 1), 200).height);
  });

  it('refuses markup that is not an <svg> element', () => {
    expect(() => svgFileText('<div></div>', { width: 1, height: 1 })).toThrow(/svg/);
  });

  it('names files <device>-<kind>.<ext> with unsafe characters replaced', () => {
    expect(chartFileName('KF-C24-0001', 'iv', 'svg')).toBe('KF-C24-0001-iv.svg');
    expect(chartFileName(' lot A/1187 (rework) ', 'overlay', 'png')).toBe('lot-A-1187-rework-overlay.png');
    expect(chartFileName('  ', 'iv', 'svg')).toBe('chart-iv.svg');
  });
});

describe('overlayTones', () => {
  const curve = (id: string, severity: 'pass' | 'warn' | 'fail') => ({ id, severity });

  it('counts exactly the curves it colours and draws them last (on top), failing above warnings', () => {
    const curves = [curve('a', 'fail'), curve('b', 'pass'), curve('c', 'warn'), curve('d', 'fail'), curve('e', 'pass'), curve('f', 'warn')];
    const { ordered, counts } = overlayTones(curves);
    expect(counts).toEqual({ fail: 2, warn: 2, pass: 2 });
    expect(ordered.filter((o) => o.tone !== 'pass').length).toBe(counts.fail + counts.warn);
    // Grey first, then warnings, then failing, each in the server's order.
    expect(ordered.map((o) => o.curve.id)).toEqual(['b', 'e', 'c', 'f', 'a', 'd']);
  });
});
