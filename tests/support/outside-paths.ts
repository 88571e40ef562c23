/**
 * Finds places in source code that refer to a file-system path outside the repository: a
 * relative literal that climbs above the root (`'../shared/…'`, an import of `'../../../x'`), a
 * `path.resolve`/`path.join` whose result lands above the root (`path.resolve(__dirname,
 * '../../..', 'shared')`), or an absolute literal into the folder that holds the repository (or a
 * home or work folder). A fresh clone with nothing beside it must have everything its code reads.
 *
 * A line that must name such a path on purpose (a test that checks nothing was written above the
 * working folder) carries `repository-check: outside on purpose` and a reason, on the line itself
 * or the line above.
 */
import path from 'node:path';
import ts from 'typescript';

export type OutsidePath = { file: string; line: number; text: string; resolved: string };

export const ALLOW_MARKER = 'repository-check: outside on purpose';

/** Absolute literals that name personal or project folders, never the system's (/tmp, /usr, …). */
const PROJECT_ROOTS = /^\/(work|home|root|Users|mnt|srv|workspace|workspaces)(\/|$)/;

const inside = (root: string, p: string) => p === root || p.startsWith(root + path.sep);

/**
 * Checks one file's text. `file` is its absolute path (its folder is what `__dirname` and relative
 * literals resolve against), `root` the repository root (what `process.cwd()` is for the scripts
 * and tests, which all run from the root).
 */
export function findOutsidePaths(file: string, text: string, root: string): OutsidePath[] {
  const dir = path.dirname(file);
  const kind = file.endsWith('x') ? ts.ScriptKind.TSX : file.endsWith('.js') || file.endsWith('.cjs') || file.endsWith('.mjs') ? ts.ScriptKind.JS : ts.ScriptKind.TS;
  const source = ts.createSourceFile(file, text, ts.ScriptTarget.Latest, true, kind);
  const lines = text.split('\n');
  const found: OutsidePath[] = [];
  /** Values of `const NAME = <path expression>` seen so far, so `path.join(ROOT, '..')` is judged too. */
  const known = new Map<string, string>();

  const report = (node: ts.Node, resolved: string) => {
    const line = source.getLineAndCharacterOfPosition(node.getStart(source)).line;
    const here = lines[line] ?? '';
    const above = line > 0 ? lines[line - 1] : '';
    if (here.includes(ALLOW_MARKER) || above.includes(ALLOW_MARKER)) return;
    found.push({ file, line: line + 1, text: node.getText(source).slice(0, 160), resolved });
  };

  const literalText = (node: ts.Node): string | undefined =>
    ts.isStringLiteral(node) || ts.isNoSubstitutionTemplateLiteral(node) ? node.text : undefined;

  /** The value of a path expression when it can be known without running the code. */
  const evaluate = (node: ts.Expression): string | undefined => {
    const lit = literalText(node);
    if (lit !== undefined) return lit;
    if (ts.isIdentifier(node)) return node.text === '__dirname' ? dir : known.get(node.text);
    if (ts.isParenthesizedExpression(node)) return evaluate(node.expression);
    // import.meta.dirname
    if (ts.isPropertyAccessExpression(node) && node.name.text === 'dirname' && ts.isMetaProperty(node.expression)) return dir;
    if (ts.isCallExpression(node)) {
      const callee = node.expression.getText(source);
      if (callee === 'process.cwd' && node.arguments.length === 0) return root;
      if (isPathCall(node)) {
        const parts = node.arguments.map(evaluate);
        // A bare resolve() may be a promise's: no arguments, or any unknown one, is no path.
        if (parts.length === 0 || parts.some((p) => p === undefined)) return undefined;
        const [first, ...rest] = parts as string[];
        // resolve() starts from the working folder unless an argument is absolute.
        return callee.endsWith('join') ? path.join(first, ...rest) : path.resolve(root, first, ...rest);
      }
    }
    return undefined;
  };

  const visit = (node: ts.Node) => {
    if (ts.isCallExpression(node) && isPathCall(node)) {
      const value = evaluate(node);
      if (value !== undefined && path.isAbsolute(value) && !inside(root, path.normalize(value))) {
        report(node, path.normalize(value));
        return; // its literals are the same finding
      }
    }
    if (ts.isVariableDeclaration(node) && ts.isIdentifier(node.name) && node.initializer) {
      const value = evaluate(node.initializer);
      if (value !== undefined && path.isAbsolute(value)) known.set(node.name.text, path.normalize(value));
    }
    const lit = literalText(node);
    if (lit !== undefined) {
      if (/^\.\.([/\\]|$)/.test(lit)) {
        const resolved = path.resolve(dir, lit);
        if (!inside(root, resolved)) report(node, resolved);
      } else if (path.isAbsolute(lit) && !inside(root, path.normalize(lit))) {
        const outerFolder = path.dirname(root);
        if (PROJECT_ROOTS.test(lit) || inside(outerFolder, path.normalize(lit))) report(node, path.normalize(lit));
      }
    }
    ts.forEachChild(node, visit);
  };
  visit(source);
  return found;
}

/** `path.resolve(…)`, `path.join(…)`, `path.posix.join(…)`, or a bare imported `resolve(…)`/`join(…)`. */
function isPathCall(node: ts.CallExpression): boolean {
  const e = node.expression;
  if (ts.isIdentifier(e)) return e.text === 'resolve' || e.text === 'join';
  if (!ts.isPropertyAccessExpression(e)) return false;
  if (e.name.text !== 'resolve' && e.name.text !== 'join') return false;
  const owner = e.expression.getText();
  return owner === 'path' || owner === 'path.posix' || owner === 'posix' || owner === 'nodePath';
}
