// The house's layout, checked by dependency-cruiser (`npm run check:house`).
//
// Data flows one way: use cases (src/app) → runs (src/run) → engines (src/engine) →
// stages (src/physics, signal, dsp, classify, analysis, random) → bytes (src/io).
// src/scenario turns the user's document into the typed Scenario; src/library is the API
// (one checked function per command, over src/app) and src/cli the thin command layer on top. Every rule below is an error: `depcruise` exits non-zero on any.
//
// How the TypeScript sources are read: dependency-cruiser 16 reads TypeScript through the
// compiler API of typescript < 6, and the project's typescript (7) ships no such API, so the
// sources are parsed with swc (`parser: 'swc'`, @swc/core is a dev dependency). swc reads
// each file before any compilation, so type-only imports (`import type`, `export type … from`)
// are dependencies like any other: the rules hold for them too. Relative imports carry their
// `.ts` extension (tsconfig's allowImportingTsExtensions), so they resolve as plain file
// names; tsconfig has no `paths` or `baseUrl`, so no tsConfig option is needed. The
// `no-unresolvable` rule below fails if that ever stops being true.

// src/fit (fitting a scenario to recorded traces) is pure computation like the other stages.
const STAGES = '(physics|signal|dsp|classify|analysis|random|fit)';

/** @type {import('dependency-cruiser').IConfiguration} */
module.exports = {
  forbidden: [
    {
      name: 'no-circular',
      severity: 'error',
      comment:
        'A cycle between files makes their load order matter and blurs which one owns a ' +
        'concept; data flows one way.',
      from: { path: '^src/' },
      to: { circular: true },
    },
    {
      name: 'stages-import-only-stages',
      severity: 'error',
      comment:
        'The stages are pure computation on numbers: they may use each other, the seeded ' +
        'streams, errors.ts and the Scenario type, never the engines, runs, use cases, bytes, ' +
        'the command line or the parsing side of src/scenario.',
      from: { path: `^src/${STAGES}/` },
      to: {
        path: '^src/',
        pathNot: [`^src/${STAGES}/`, '^src/errors\\.ts$', '^src/scenario/types\\.ts$'],
      },
    },
    {
      name: 'stages-no-node-builtins',
      severity: 'error',
      comment:
        'Pure stages touch no files, processes, threads or the operating system, so they run ' +
        'the same in a worker, a test or a browser.',
      from: { path: `^src/${STAGES}/` },
      to: { dependencyTypes: ['core'] },
    },
    {
      name: 'scenario-not-downstream',
      severity: 'error',
      comment:
        'Reading and validating the document comes first; it must not depend on what ' +
        'runs it or writes its results.',
      from: { path: '^src/scenario/' },
      to: { path: '^src/(engine|run|app|io|cli|library)/' },
    },
    {
      name: 'engine-not-downstream',
      severity: 'error',
      comment:
        'An engine computes one batch; planning runs, use cases, bytes and the command line ' +
        'sit above it.',
      from: { path: '^src/engine/' },
      to: { path: '^src/(run|app|io|cli|library)/' },
    },
    {
      name: 'run-not-downstream',
      severity: 'error',
      comment:
        'Runs hand results back to their caller; writing them (io) and the use cases (app, ' +
        'cli) sit above.',
      from: { path: '^src/run/' },
      to: { path: '^src/(app|io|cli|library)/' },
    },
    {
      name: 'io-bytes-only',
      severity: 'error',
      comment:
        'src/io turns values into bytes and back; it may know the stages, the Scenario and ' +
        'errors, but never runs anything (engine, run) or calls use cases (app, cli).',
      from: { path: '^src/io/' },
      to: { path: '^src/(engine|run|app|cli|library)/' },
    },
    {
      name: 'app-not-cli',
      severity: 'error',
      comment:
        'The use cases sit under the library API (src/library) and the command line, which ' +
        'call them; they call neither.',
      from: { path: '^src/app/' },
      to: { path: '^src/(cli|library)/' },
    },
    {
      name: 'library-not-cli',
      severity: 'error',
      comment:
        'The library is the API the command line calls (so the two cannot drift); it never ' +
        'calls the command line.',
      from: { path: '^src/library/' },
      to: { path: '^src/cli/' },
    },
    {
      name: 'src-not-dev-folders',
      severity: 'error',
      comment: 'Shipped code never loads tests, benchmarks or build scripts.',
      from: { path: '^src/' },
      to: { path: '^(test|bench|scripts)/' },
    },
    {
      name: 'no-unresolvable',
      severity: 'error',
      comment:
        'Every import names a file or package that exists; also proves the checker resolves ' +
        'the `.ts` import specifiers, so the rules above see every edge.',
      from: { path: '^src/' },
      to: { couldNotResolve: true },
    },
    {
      name: 'no-orphans',
      severity: 'error',
      comment:
        'A source file that nothing imports and that imports nothing is dead or forgotten. ' +
        'Ambient declaration files (.d.ts) are used without an import.',
      from: { orphan: true, path: '^src/', pathNot: '\\.d\\.ts$' },
      to: {},
    },
  ],
  options: {
    parser: 'swc',
    tsPreCompilationDeps: true,
    doNotFollow: { path: 'node_modules' },
    moduleSystems: ['es6', 'cjs'],
    enhancedResolveOptions: {
      exportsFields: ['exports'],
      conditionNames: ['import', 'require', 'node', 'default', 'types'],
      mainFields: ['module', 'main', 'types', 'typings'],
    },
    reporterOptions: {
      text: { highlightFocused: true },
    },
  },
};
