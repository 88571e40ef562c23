import { theme } from '@/components/theme';
import { svgFileText } from '@/lib/charts/svg-file';
import type { LegendItem } from '@/lib/charts/svg-file';
import { downloadBlob } from '@/lib/download';

/**
 * Saving a rendered chart on the web: the first <svg> under `host` (react-native-svg renders
 * real SVG elements there) serialised to a file, or drawn onto a canvas at twice its size for a
 * PNG. Returns false when there is nothing to save (not on the web, chart not drawn yet).
 */
export type ChartFile = { file_name: string; title?: string; legend?: readonly LegendItem[] };

function chartSvgText(host: unknown, file: ChartFile): { text: string; width: number; height: number } | null {
  if (typeof document === 'undefined' || typeof XMLSerializer === 'undefined') return null;
  if (!host || typeof (host as Element).querySelector !== 'function') return null;
  const svg = (host as Element).querySelector('svg');
  if (!svg) return null;
  const box = svg.getBoundingClientRect();
  const width = Math.round(box.width);
  const height = Math.round(box.height);
  const text = svgFileText(new XMLSerializer().serializeToString(svg), { width, height, title: file.title, background: theme.color.surface, legend: file.legend });
  const m = /<svg[^>]*\sheight="(\d+)"/.exec(text);
  return { text, width, height: m ? Number(m[1]) : height };
}

export function downloadChartSvg(host: unknown, file: ChartFile): boolean {
  const svg = chartSvgText(host, file);
  if (!svg) return false;
  downloadBlob(file.file_name, new Blob([svg.text], { type: 'image/svg+xml;charset=utf-8' }));
  return true;
}

export function downloadChartPng(host: unknown, file: ChartFile, scale = 2): boolean {
  const svg = chartSvgText(host, file);
  if (!svg) return false;
  const url = URL.createObjectURL(new Blob([svg.text], { type: 'image/svg+xml;charset=utf-8' }));
  const img = new Image();
  img.onload = () => {
    const canvas = document.createElement('canvas');
    canvas.width = svg.width * scale;
    canvas.height = svg.height * scale;
    const ctx = canvas.getContext('2d');
    if (ctx) {
      ctx.scale(scale, scale);
      ctx.drawImage(img, 0, 0, svg.width, svg.height);
      canvas.toBlob((blob) => {
        if (blob) downloadBlob(file.file_name, blob);
      }, 'image/png');
    }
    URL.revokeObjectURL(url);
  };
  img.onerror = () => URL.revokeObjectURL(url);
  img.src = url;
  return true;
}
