/*
 * A stand-in for the analysis thread's handler (tests/server/analysis-pool.test.ts): each request
 * takes ~20 ms, and the file named "die.csv" ends its thread, as a crash in the engine would.
 */
module.exports = (req) => {
  const until = Date.now() + 20;
  while (Date.now() < until);
  if (req.fileName === 'die.csv') process.exit(1);
  return { ok: true, analysis: { file: req.fileName } };
};
