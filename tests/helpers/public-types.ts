/**
 * Finds the types a module's public surface mentions but does not export: for every exported
 * function, class, constant, interface and type alias of an entry module, the named types in its
 * signature (parameters, results, properties, recursively) that are declared under `src/` and
 * are not themselves exported by the entry. A user of the library can then name every value the
 * entry hands out or takes.
 */
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import ts from 'typescript';

const repository = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const sourceFolder = join(repository, 'src');

/** A type the entry's surface mentions, and one export that mentions it. */
export interface MentionedType {
  /** The type's name. */
  type: string;
  /** The exported name whose signature leads to it. */
  mentionedBy: string;
  /** Whether it is named in the export's own signature (a parameter or result), not only inside another type. */
  direct: boolean;
}

/** What {@link surfacesOf} found for one entry module. */
export interface Surface {
  /** Names the entry exports (values and types). */
  exported: string[];
  /** Types declared under `src/` that the surface mentions, directly or inside other types. */
  mentioned: MentionedType[];
  /** Those of `mentioned` that the entry does not export. */
  missing: MentionedType[];
}

/**
 * Examines the exports of entry modules (paths relative to the repository, e.g. `src/index.ts`).
 *
 * @param entries - entry module paths
 * @returns one surface per entry, in order
 */
export function surfacesOf(entries: readonly string[]): Surface[] {
  const files = entries.map((entry) => join(repository, entry));
  const program = ts.createProgram(files, {
    target: ts.ScriptTarget.ES2022,
    module: ts.ModuleKind.NodeNext,
    moduleResolution: ts.ModuleResolutionKind.NodeNext,
    strict: true,
    skipLibCheck: true,
    noEmit: true,
  });
  const checker = program.getTypeChecker();
  return files.map((file) => surfaceOf(program, checker, file));
}

function surfaceOf(program: ts.Program, checker: ts.TypeChecker, file: string): Surface {
  const source = program.getSourceFile(file);
  if (source === undefined) throw new Error(`${file}: not in the program`);
  const moduleSymbol = checker.getSymbolAtLocation(source);
  if (moduleSymbol === undefined) throw new Error(`${file}: not a module`);
  const exports = checker.getExportsOfModule(moduleSymbol);
  const resolved = (symbol: ts.Symbol): ts.Symbol =>
    symbol.flags & ts.SymbolFlags.Alias ? checker.getAliasedSymbol(symbol) : symbol;
  const exportedSymbols = new Set(exports.map(resolved));
  const mentioned = new Map<ts.Symbol, MentionedType>();
  const expanded = new Set<ts.Symbol>();

  const inSource = (symbol: ts.Symbol): boolean =>
    (symbol.declarations ?? []).some((d) => d.getSourceFile().fileName.startsWith(sourceFolder));

  // `direct`: still in the export's own signature; it turns false once inside a named type.
  const visitType = (type: ts.Type, from: string, direct: boolean): void => {
    const symbol = type.aliasSymbol ?? type.getSymbol();
    let insideNamed = direct;
    if (symbol !== undefined && inSource(symbol) && !(symbol.flags & ts.SymbolFlags.TypeParameter)) {
      const isNamedType =
        symbol.flags &
        (ts.SymbolFlags.Interface | ts.SymbolFlags.TypeAlias | ts.SymbolFlags.Class | ts.SymbolFlags.Enum);
      if (isNamedType) {
        const known = mentioned.get(symbol);
        if (known === undefined) mentioned.set(symbol, { type: symbol.name, mentionedBy: from, direct });
        else if (direct && !known.direct)
          mentioned.set(symbol, { type: symbol.name, mentionedBy: from, direct });
        insideNamed = false;
      }
      if (expanded.has(symbol)) return;
      expanded.add(symbol);
    }
    if (type.aliasTypeArguments !== undefined)
      for (const t of type.aliasTypeArguments) visitType(t, from, direct);
    if (type.isUnionOrIntersection()) for (const t of type.types) visitType(t, from, insideNamed);
    if (checker.isArrayType(type) || checker.isTupleType(type))
      for (const t of checker.getTypeArguments(type as ts.TypeReference)) visitType(t, from, direct);
    for (const signature of [...type.getCallSignatures(), ...type.getConstructSignatures()])
      visitSignature(signature, from, insideNamed);
    if (symbol !== undefined && inSource(symbol) && type.isClassOrInterface()) visitMembers(type, from);
    else if (
      type.flags & ts.TypeFlags.Object &&
      symbol !== undefined &&
      symbol.flags & ts.SymbolFlags.TypeLiteral
    )
      visitMembers(type, from);
  };
  const visitMembers = (type: ts.Type, from: string): void => {
    for (const property of checker.getPropertiesOfType(type)) {
      const declaration = property.valueDeclaration ?? property.declarations?.[0];
      if (declaration === undefined || !declaration.getSourceFile().fileName.startsWith(sourceFolder))
        continue;
      visitType(checker.getTypeOfSymbolAtLocation(property, declaration), from, false);
    }
  };
  const visitSignature = (signature: ts.Signature, from: string, direct: boolean): void => {
    for (const parameter of signature.getParameters()) {
      const declaration = parameter.valueDeclaration;
      if (declaration !== undefined)
        visitType(checker.getTypeOfSymbolAtLocation(parameter, declaration), from, direct);
    }
    visitType(signature.getReturnType(), from, direct);
  };

  for (const exported of exports) {
    const symbol = resolved(exported);
    const declaration = symbol.valueDeclaration ?? symbol.declarations?.[0];
    if (declaration === undefined) continue;
    if (symbol.flags & (ts.SymbolFlags.Interface | ts.SymbolFlags.TypeAlias | ts.SymbolFlags.Class)) {
      visitType(checker.getDeclaredTypeOfSymbol(symbol), exported.name, true);
    }
    if (symbol.flags & ts.SymbolFlags.Value) {
      visitType(checker.getTypeOfSymbolAtLocation(symbol, declaration), exported.name, true);
    }
  }
  const all = [...mentioned].sort(([, a], [, b]) => a.type.localeCompare(b.type));
  return {
    exported: exports.map((s) => s.name).sort(),
    mentioned: all.map(([, m]) => m),
    missing: all.filter(([symbol]) => !exportedSymbols.has(symbol)).map(([, m]) => m),
  };
}
