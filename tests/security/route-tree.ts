// The app's entry points as they are on disk: every page, every route handler with the HTTP
// methods it exports, and every server action. Read from the source with the TypeScript parser,
// so the role matrix cannot drift from the routes that really exist.
//
// URL patterns follow the App Router's file conventions (Next.js docs, "Project structure" and
// "Route groups"): a folder `(name)` is a route group and adds nothing to the URL, `@slot` is a
// parallel route slot, a folder starting with `_` is private and never routed, `[param]`,
// `[...param]` and `[[...param]]` are dynamic segments and are kept as they are written.
import fs from "node:fs";
import path from "node:path";
import ts from "typescript";

export const ROOT = path.resolve(import.meta.dirname, "..", "..");

/** Methods a route handler may export (Next.js docs, "route.js": supported HTTP methods). */
export const HTTP_METHODS = ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"] as const;
export type HttpMethod = (typeof HTTP_METHODS)[number];

export interface PageEntry {
  /** Repository-relative file, e.g. app/(shop)/jobs/[jobId]/page.tsx. */
  file: string;
  /** URL pattern, e.g. /jobs/[jobId]. */
  pattern: string;
}

export interface RouteHandlerEntry {
  file: string;
  pattern: string;
  methods: HttpMethod[];
}

export interface ServerActionEntry {
  /** Repository-relative module, e.g. lib/actions/jobs.ts. */
  file: string;
  /** Exported function name. */
  name: string;
}

const SOURCE = /\.(tsx?|jsx?|mdx)$/;
const PAGE = /^page\.(tsx?|jsx?|mdx)$/;
const ROUTE = /^route\.(tsx?|jsx?)$/;

const rel = (abs: string) => path.relative(ROOT, abs).split(path.sep).join("/");

function walk(dir: string, visit: (abs: string, name: string) => void): void {
  if (!fs.existsSync(dir)) return;
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const abs = path.join(dir, entry.name);
    if (entry.isDirectory()) {
      if (entry.name === "node_modules" || entry.name.startsWith(".")) continue;
      walk(abs, visit);
    } else if (entry.isFile()) {
      visit(abs, entry.name);
    }
  }
}

/** The URL pattern of a file under app/, or null when its folder is private (never routed). */
export function urlPattern(fileUnderApp: string): string | null {
  const segments = fileUnderApp.split("/").slice(0, -1);
  const kept: string[] = [];
  for (const s of segments) {
    if (s.startsWith("_")) return null;
    if (s.startsWith("(") && s.endsWith(")")) continue;
    if (s.startsWith("@")) continue;
    kept.push(s);
  }
  return `/${kept.join("/")}`;
}

function parse(abs: string, text = fs.readFileSync(abs, "utf8")): ts.SourceFile {
  const kind = abs.endsWith("x") ? ts.ScriptKind.TSX : ts.ScriptKind.TS;
  return ts.createSourceFile(abs, text, ts.ScriptTarget.Latest, true, kind);
}

/** Sources that could hold a "use server" directive; the others are not parsed at all. */
function mentionsUseServer(abs: string): string | null {
  const text = fs.readFileSync(abs, "utf8");
  return /["']use server["']/.test(text) ? text : null;
}

const hasExport = (node: ts.Node) =>
  ts.canHaveModifiers(node) &&
  (ts.getModifiers(node) ?? []).some((m) => m.kind === ts.SyntaxKind.ExportKeyword);

/** Every name a module exports: declarations, `export { a as B }` lists and re-exports. */
export function exportedNames(source: ts.SourceFile): string[] {
  const names: string[] = [];
  for (const st of source.statements) {
    if (ts.isFunctionDeclaration(st) && hasExport(st) && st.name) names.push(st.name.text);
    else if (ts.isClassDeclaration(st) && hasExport(st) && st.name) names.push(st.name.text);
    else if (ts.isVariableStatement(st) && hasExport(st)) {
      for (const d of st.declarationList.declarations)
        if (ts.isIdentifier(d.name)) names.push(d.name.text);
    } else if (
      ts.isExportDeclaration(st) &&
      !st.isTypeOnly &&
      st.exportClause &&
      ts.isNamedExports(st.exportClause)
    ) {
      for (const el of st.exportClause.elements) if (!el.isTypeOnly) names.push(el.name.text);
    }
  }
  return names;
}

/** The directive prologue of a statement list: "use server", "use client" and the like. */
function directives(statements: ts.NodeArray<ts.Statement>): string[] {
  const out: string[] = [];
  for (const st of statements) {
    if (ts.isExpressionStatement(st) && ts.isStringLiteral(st.expression))
      out.push(st.expression.text);
    else break;
  }
  return out;
}

export function listPages(appDir = path.join(ROOT, "app")): PageEntry[] {
  const out: PageEntry[] = [];
  walk(appDir, (abs, name) => {
    if (!PAGE.test(name)) return;
    const pattern = urlPattern(path.relative(appDir, abs).split(path.sep).join("/"));
    if (pattern !== null) out.push({ file: rel(abs), pattern });
  });
  return out.sort((a, b) => a.pattern.localeCompare(b.pattern));
}

export function listRouteHandlers(appDir = path.join(ROOT, "app")): RouteHandlerEntry[] {
  const out: RouteHandlerEntry[] = [];
  walk(appDir, (abs, name) => {
    if (!ROUTE.test(name)) return;
    const pattern = urlPattern(path.relative(appDir, abs).split(path.sep).join("/"));
    if (pattern === null) return;
    const exported = new Set(exportedNames(parse(abs)));
    const methods = HTTP_METHODS.filter((m) => exported.has(m));
    out.push({ file: rel(abs), pattern, methods });
  });
  return out.sort((a, b) => a.pattern.localeCompare(b.pattern));
}

/** Every exported function of every module whose first statement is "use server". */
export function listServerActions(
  dirs = ["app", "lib", "components"].map((d) => path.join(ROOT, d)),
): ServerActionEntry[] {
  const out: ServerActionEntry[] = [];
  for (const dir of dirs) {
    walk(dir, (abs, name) => {
      if (!SOURCE.test(name) || name.endsWith(".d.ts")) return;
      const text = mentionsUseServer(abs);
      if (text === null) return;
      const source = parse(abs, text);
      if (!directives(source.statements).includes("use server")) return;
      for (const n of exportedNames(source)) out.push({ file: rel(abs), name: n });
    });
  }
  return out.sort((a, b) => `${a.file}#${a.name}`.localeCompare(`${b.file}#${b.name}`));
}

/**
 * Functions that declare "use server" in their own body (actions written inline in a server
 * component). They are public endpoints like any other action, but have no name the matrix could
 * list, so the coverage test refuses them.
 */
export function listInlineServerActions(
  dirs = ["app", "lib", "components"].map((d) => path.join(ROOT, d)),
): string[] {
  const out: string[] = [];
  for (const dir of dirs) {
    walk(dir, (abs, name) => {
      if (!SOURCE.test(name) || name.endsWith(".d.ts")) return;
      const text = mentionsUseServer(abs);
      if (text === null) return;
      const source = parse(abs, text);
      const visit = (node: ts.Node): void => {
        if (
          ts.isFunctionLike(node) &&
          "body" in node &&
          node.body &&
          ts.isBlock(node.body as ts.Node)
        ) {
          if (directives((node.body as ts.Block).statements).includes("use server")) {
            const { line } = source.getLineAndCharacterOfPosition(node.getStart());
            out.push(`${rel(abs)}:${line + 1}`);
          }
        }
        ts.forEachChild(node, visit);
      };
      visit(source);
    });
  }
  return out.sort();
}

/** How the matrix names a route handler's method: "GET /api/jobs". */
export const routeKey = (method: HttpMethod, pattern: string) => `${method} ${pattern}`;
/** How the matrix names a server action: "lib/actions/jobs.ts#createJob". */
export const actionKey = (a: ServerActionEntry) => `${a.file}#${a.name}`;
