/**
 * Starting a file download from the web app: a server route with Content-Disposition (cookies go
 * along), or text made in the browser (the comparison grid's view). No-ops off the web.
 */
export function downloadFromUrl(url: string): void {
  if (typeof document === 'undefined') return;
  const a = document.createElement('a');
  a.href = url;
  a.rel = 'noopener';
  document.body.appendChild(a);
  a.click();
  a.remove();
}

/** Saves a blob made in the browser under the given name (an <a download> click). */
export function downloadBlob(fileName: string, blob: Blob): void {
  if (typeof document === 'undefined' || typeof URL === 'undefined') return;
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = fileName;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

export function downloadText(fileName: string, text: string, type = 'text/csv;charset=utf-8'): void {
  downloadBlob(fileName, new Blob([text], { type }));
}
