// The layers stay apart: the engine never imports vscode or the host, and the host and protocol
// take only types from the engine (all engine computation runs in the worker), apart from the
// pure formatters listed below, which the CLI and the extension share.
import * as assert from 'node:assert/strict';
import { readdirSync, readFileSync } from 'node:fs';
import * as path from 'node:path';
import ts from 'typescript';
import { formattersSharedWithHost, projectRoot } from './fixtures/buildBundle';

interface ImportSite {
  file: string;
  specifier: string;
  typeOnly: boolean;
}

function sourceFiles(folder: string): string[] {
  return readdirSync(folder, { recursive: true, withFileTypes: true })
    .filter((entry) => entry.isFile() && entry.name.endsWith('.ts'))
    .map((entry) => path.join(entry.parentPath, entry.name));
}

function importsOf(file: string): ImportSite[] {
  const source = ts.createSourceFile(file, readFileSync(file, 'utf8'), ts.ScriptTarget.ES2022, true);
  const sites: ImportSite[] = [];
  const visit = (node: ts.Node): void => {
    if (ts.isImportDeclaration(node) && ts.isStringLiteral(node.moduleSpecifier)) {
      const clause = node.importClause;
      const named = clause?.namedBindings && ts.isNamedImports(clause.namedBindings) ? clause.namedBindings.elements : undefined;
      const typeOnly =
        clause !== undefined &&
        (clause.isTypeOnly || (clause.name === undefined && named !== undefined && named.length > 0 && named.every((e) => e.isTypeOnly)));
      sites.push({ file, specifier: node.moduleSpecifier.text, typeOnly });
    } else if (ts.isExportDeclaration(node) && node.moduleSpecifier && ts.isStringLiteral(node.moduleSpecifier)) {
      sites.push({ file, specifier: node.moduleSpecifier.text, typeOnly: node.isTypeOnly });
    } else if (ts.isImportEqualsDeclaration(node) && ts.isExternalModuleReference(node.moduleReference)) {
      const expression = node.moduleReference.expression;
      if (ts.isStringLiteral(expression)) sites.push({ file, specifier: expression.text, typeOnly: node.isTypeOnly });
    } else if (ts.isCallExpression(node) && node.arguments.length > 0 && ts.isStringLiteralLike(node.arguments[0])) {
      const isDynamicImport = node.expression.kind === ts.SyntaxKind.ImportKeyword;
      const isRequire = ts.isIdentifier(node.expression) && node.expression.text === 'require';
      if (isDynamicImport || isRequire) sites.push({ file, specifier: node.arguments[0].text, typeOnly: false });
    } else if (ts.isImportTypeNode(node) && ts.isLiteralTypeNode(node.argument) && ts.isStringLiteral(node.argument.literal)) {
      sites.push({ file, specifier: node.argument.literal.text, typeOnly: true });
    }
    ts.forEachChild(node, visit);
  };
  visit(source);
  return sites;
}

function resolvesInto(site: ImportSite, folder: string): boolean {
  if (!site.specifier.startsWith('.')) return false;
  const target = path.resolve(path.dirname(site.file), site.specifier);
  const relative = path.relative(folder, target);
  return relative === '' || (!relative.startsWith(`..${path.sep}`) && relative !== '..' && !path.isAbsolute(relative));
}

const describeSite = (site: ImportSite) => `${path.relative(projectRoot, site.file)} imports '${site.specifier}'`;

describe('layering of src/', () => {
  const engine = path.join(projectRoot, 'src', 'engine');
  const host = path.join(projectRoot, 'src', 'host');
  const protocol = path.join(projectRoot, 'src', 'protocol');

  it('finds import sites of every form (checked on a sample written here)', () => {
    const sample = path.join(projectRoot, 'test', 'host', 'fixtures', 'importForms.ts.txt');
    const sites = importsOf(sample).map((s) => `${s.specifier}${s.typeOnly ? ' (type)' : ''}`);
    assert.deepEqual(sites, ['vscode', 'a (type)', 'b (type)', 'c', 'd', 'e (type)', 'f', 'g', 'h (type)']);
  });

  it('src/engine never imports vscode or anything from src/host', () => {
    const engineFiles = sourceFiles(engine);
    assert.ok(engineFiles.length > 5, 'expected the engine sources to be found');
    const offending = engineFiles
      .flatMap(importsOf)
      .filter((site) => site.specifier === 'vscode' || site.specifier.startsWith('vscode/') || resolvesInto(site, host));
    assert.deepEqual(offending.map(describeSite), []);
  });

  it('src/host and src/protocol take only types from src/engine, apart from the shared formatters', () => {
    const files = [...sourceFiles(host), ...sourceFiles(protocol)];
    assert.ok(
      files.some((file) => file.endsWith('extension.ts')),
      'expected the host sources to be found',
    );
    const allowed = new Set(formattersSharedWithHost.map((file) => path.join(projectRoot, file)));
    const isSharedFormatter = (site: ImportSite) =>
      site.file.startsWith(host) && allowed.has(`${path.resolve(path.dirname(site.file), site.specifier)}.ts`);
    const offending = files.flatMap(importsOf).filter((site) => resolvesInto(site, engine) && !site.typeOnly && !isSharedFormatter(site));
    assert.deepEqual(offending.map(describeSite), []);
  });

  it('the shared formatters import nothing but types', () => {
    const offending = formattersSharedWithHost
      .map((file) => path.join(projectRoot, file))
      .flatMap(importsOf)
      .filter((site) => !site.typeOnly);
    assert.deepEqual(offending.map(describeSite), []);
  });

  it('src/protocol imports neither vscode nor the host', () => {
    const offending = sourceFiles(protocol)
      .flatMap(importsOf)
      .filter((site) => site.specifier === 'vscode' || resolvesInto(site, host));
    assert.deepEqual(offending.map(describeSite), []);
  });
});
