/*
 * The file piscina loads in each analysis thread (server/services/analysis-pool.ts). piscina
 * loads it with a plain require, and a worker thread does not inherit the parent's TypeScript
 * loader (under jest there is none at all), so tsx's require hook is registered first; then the
 * handler in analysis-worker.ts is loaded through it (its `@/` imports resolve by tsconfig).
 */
require('tsx/cjs/api').register();
module.exports = require('./analysis-worker.ts');
