/**
 * zod's global settings, imported for their effect by the leaf schema modules (numbers.ts,
 * text.ts) so they hold before any schema parses. `jitless`: zod 4 probes whether it may compile
 * parsers with `new Function`, and under the web app's Content-Security-Policy (no 'unsafe-eval',
 * server/guards.ts) that probe is reported as a violation in the browser. Our bodies and forms are
 * small, so the interpreted parser costs nothing noticeable.
 */
import { z } from 'zod';

/**
 * Sets them; called by the web app's root layout too, because the production export's tree
 * shaking (scripts/build-web.ts) drops an import made only for its effect.
 */
export function applyZodSettings(): void {
  z.config({ jitless: true });
}

applyZodSettings();
