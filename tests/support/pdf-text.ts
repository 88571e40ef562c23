/**
 * The text of a PDF, read back with pdf-parse (pdf.js) in a plain Node child process: pdf.js sets
 * up its worker through a dynamic import, which jest's module sandbox refuses without
 * --experimental-vm-modules.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';

const REPO = path.resolve(__dirname, '..', '..');
const SCRIPT = `
import { PDFParse } from 'pdf-parse';
const chunks = [];
for await (const c of process.stdin) chunks.push(c);
const parser = new PDFParse({ data: new Uint8Array(Buffer.concat(chunks)) });
const { text, total } = await parser.getText();
process.stdout.write(JSON.stringify({ text, pages: total }));
await parser.destroy();
`;

export function pdfText(bytes: Buffer): { text: string; pages: number } {
  const out = spawnSync(process.execPath, ['--input-type=module', '-e', SCRIPT], { cwd: REPO, input: bytes, encoding: 'utf8', timeout: 60_000, maxBuffer: 64 * 1024 * 1024 });
  if (out.status !== 0) throw new Error(`pdf-parse failed (${out.status}): ${out.stderr}`);
  return JSON.parse(out.stdout) as { text: string; pages: number };
}
