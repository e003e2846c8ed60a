// ESLint (flat config): typescript-eslint's recommended rules everywhere, react-hooks for the
// editor, and the house boundaries (DEVELOPERS.md, "Boundaries"):
//  - packages/* are pure: no apps, React, DOM or Node (`node:*`, builtins, DOM/Node globals);
//  - code reaches another package only through its entry `@loopwright/<name>`, and test code
//    may also use `@loopwright/<name>/testing`; relative paths never leave a package or app.
// The type-check enforces the same purity from the other side (no DOM lib, no Node types).
import { builtinModules } from 'node:module';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import js from '@eslint/js';
import reactHooks from 'eslint-plugin-react-hooks';
import globals from 'globals';
import tseslint from 'typescript-eslint';

const ROOT = path.dirname(fileURLToPath(import.meta.url));

/** Files that only tests run: the tests beside code, their builders and tests/. */
const TEST_FILES = [
  '**/*.test.ts',
  '**/*.test.tsx',
  'packages/*/src/testing.ts',
  'packages/*/src/**/test-*.ts',
  'packages/*/src/test-support/**',
  'tests/**',
];
const PURE_SOURCES = ['packages/*/src/**/*.{ts,tsx}'];

/** Globals every runtime of the pure packages has (declared for them in types/portable-globals.d.ts). */
const PORTABLE_GLOBALS = new Set(['console', 'performance', 'structuredClone']);
const ES_GLOBALS = new Set(Object.keys(globals.es2022));
/** Globals that exist only in a browser, a worker or Node: off limits in packages/*. */
const PLATFORM_GLOBALS = [...new Set([...Object.keys(globals.browser), ...Object.keys(globals.worker), ...Object.keys(globals.node)])]
  .filter((g) => !ES_GLOBALS.has(g) && !PORTABLE_GLOBALS.has(g))
  .sort();

const pureImports = {
  paths: [
    ...builtinModules
      .filter((m) => !m.startsWith('_'))
      .map((name) => ({ name, message: 'packages/* are pure: no Node modules (take data as arguments; I/O belongs in an app).' })),
  ],
  patterns: [
    { regex: '^node:', message: 'packages/* are pure: no Node modules (take data as arguments; I/O belongs in an app).' },
    {
      regex: '^(react|react-dom|@xyflow|zustand|zundo|echarts|elkjs)(/|$)',
      message: 'packages/* are pure: no React, DOM or editor libraries.',
    },
    { regex: '^@loopwright/(editor|cli)(/|$)', message: 'packages/* never import apps.' },
  ],
};

/**
 * Package boundaries that a list of forbidden names cannot express: a relative import must stay
 * inside its own package or app, and `@loopwright/<name>/<path>` is allowed only for the
 * `testing` entry, from test code.
 */
const boundaries = {
  meta: {
    type: 'problem',
    schema: [],
    messages: {
      escape: 'Relative import "{{source}}" leaves {{from}}: import {{entry}} instead.',
      deep: 'Import "{{source}}" reaches into a package\'s files: use its entry "{{entry}}".',
      testing: '"{{source}}" holds test-only helpers: only tests and their builders may import it.',
    },
  },
  create(context) {
    const file = path.relative(ROOT, context.filename).split(path.sep).join('/');
    const home = /^(packages|apps)\/[^/]+/.exec(file)?.[0];
    const isTest = /(\.test\.tsx?$|^tests\/|^packages\/[^/]+\/src\/(testing\.ts$|test-support\/|(.*\/)?test-[^/]*\.ts$))/.test(file);
    const check = (node) => {
      const source = node?.type === 'Literal' && typeof node.value === 'string' ? node.value : undefined;
      if (source === undefined) return;
      if (source.startsWith('.')) {
        const target = path
          .relative(ROOT, path.resolve(path.dirname(context.filename), source))
          .split(path.sep)
          .join('/');
        // Inside a package or app: anything of its own. Elsewhere (tests/, configs): nothing of one.
        if (home ? target === home || target.startsWith(home + '/') : !/^(packages|apps)\//.test(target)) return;
        const other = /^(packages|apps)\/([^/]+)/.exec(target);
        const name = other ? `@loopwright/${other[2]}` : '';
        const entry = !other ? 'through a package entry' : isTest ? `"${name}" (or "${name}/testing")` : `"${name}"`;
        context.report({ node, messageId: 'escape', data: { source, from: home ?? path.dirname(file), entry } });
        return;
      }
      const deep = /^@loopwright\/([^/]+)\/(.+)$/.exec(source);
      if (!deep) return;
      if (deep[2] !== 'testing') context.report({ node, messageId: 'deep', data: { source, entry: `@loopwright/${deep[1]}` } });
      else if (!isTest) context.report({ node, messageId: 'testing', data: { source } });
    };
    return {
      ImportDeclaration: (n) => check(n.source),
      ExportNamedDeclaration: (n) => check(n.source),
      ExportAllDeclaration: (n) => check(n.source),
      ImportExpression: (n) => check(n.source),
    };
  },
};

export default tseslint.config(
  {
    ignores: ['**/node_modules/**', '**/dist/**', '**/.tsbuild/**', 'test-artifacts/**', 'coverage/**', 'packages/sim/types/**'],
  },
  { linterOptions: { reportUnusedDisableDirectives: 'error' } },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    files: ['**/*.{js,mjs,cjs}'],
    languageOptions: { globals: { ...globals.node } },
  },
  {
    // Everything of ours: the boundary rule, and unused names allowed when marked with a leading underscore.
    files: ['**/*.{ts,tsx,js,mjs}'],
    plugins: { loopwright: { rules: { boundaries } } },
    rules: {
      'loopwright/boundaries': 'error',
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrorsIgnorePattern: '^_' }],
    },
  },
  {
    files: PURE_SOURCES,
    ignores: TEST_FILES,
    rules: {
      'no-restricted-imports': ['error', pureImports],
      'no-restricted-globals': [
        'error',
        ...PLATFORM_GLOBALS.map((name) => ({
          name,
          message: 'packages/* are pure: no DOM or Node globals (take it as an argument, or move this into an app).',
        })),
      ],
    },
  },
  {
    // The editor runs in the browser and its workers: no Node modules.
    files: ['apps/editor/src/**/*.{ts,tsx}'],
    ignores: TEST_FILES,
    rules: {
      'no-restricted-imports': ['error', { patterns: [{ regex: '^node:', message: 'The editor runs in the browser: no Node modules.' }] }],
    },
  },
  {
    files: ['apps/editor/src/**/*.{ts,tsx}'],
    ...reactHooks.configs.flat['recommended-latest'],
  },
  {
    files: ['apps/editor/src/**/*.{ts,tsx}'],
    rules: {
      // Every dependency list is complete, or says why not in a disable comment.
      'react-hooks/exhaustive-deps': 'error',
      // The editor resets a field's draft (and the canvas its nodes) from props in an effect on
      // purpose: one extra render on a prop change, which these views afford. The React Compiler
      // that this rule prepares for is not used.
      'react-hooks/set-state-in-effect': 'off',
    },
  },
  {
    // Tests feed deliberately malformed input (`as any`) and build throwaway shapes.
    files: TEST_FILES,
    rules: { '@typescript-eslint/no-explicit-any': 'off' },
  },
);
