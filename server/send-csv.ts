import type { Response } from 'express';

/**
 * Sends a CSV file as an attachment: `text/csv` with UTF-8 and `header=present` (RFC 4180 §3: the
 * first record is the header), and the file's name. The names are made of safe characters by the
 * services (no quote or line break reaches the header).
 */
export function sendCsv(res: Response, csv: { fileName: string; text: string }): void {
  res.setHeader('Content-Type', 'text/csv; charset=utf-8; header=present');
  res.setHeader('Content-Disposition', `attachment; filename="${csv.fileName.replace(/["\\\r\n]/g, '_')}"`);
  res.send(csv.text);
}
