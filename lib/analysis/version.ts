/**
 * The version of the reader and fits that analysed a curve. Raise it when a change to
 * lib/iv/parse*.ts or the fits would read or fit a file differently; a curve re-analysed from its
 * original file (POST /api/curves/:id/reanalyse) names the version in its fit history.
 */
export const ANALYSIS_VERSION = 1;
