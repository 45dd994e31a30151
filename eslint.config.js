// @ts-check
// The quality gate: typescript-eslint's type-checked rules, React hooks, import cycles and the
// layer boundaries of DEVELOPERS.md. `npm run lint` runs it; `.ci/run` runs it before the tests.
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';
import importX from 'eslint-plugin-import-x';
import globals from 'globals';

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', '.data/**', 'test-artifacts/**', 'tests/artifacts/**', '**/*.mjs', '**/*.cjs'] },
  js.configs.recommended,
  ...tseslint.configs.recommendedTypeChecked,
  {
    languageOptions: {
      parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname },
      globals: { ...globals.node, ...globals.browser },
    },
    plugins: { 'import-x': importX },
    rules: {
      'import-x/no-cycle': ['error', { maxDepth: 10, ignoreExternal: true }],
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrorsIgnorePattern: '^_' }],
      // Event handlers may start async work (react-hook-form's handleSubmit, Express 5 handlers); the promise
      // itself is still checked everywhere else.
      // React Router's loaders throw redirect responses, as its documentation shows.
      '@typescript-eslint/only-throw-error': ['error', { allow: [{ from: 'lib', name: 'Response' }] }],
      '@typescript-eslint/no-misused-promises': ['error', { checksVoidReturn: { attributes: false, arguments: false } }],
    },
  },
  {
    // Kysely's own migration convention: a migration sees the database as it was then, not today's types.
    files: ['db/migrations/**/*.ts'],
    rules: { '@typescript-eslint/no-explicit-any': 'off' },
  },
  {
    // Tests read untyped JSON bodies from supertest and the browser; they assert the shape themselves.
    files: ['tests/**/*.ts', '**/__tests__/**/*.{ts,tsx}'],
    rules: {
      '@typescript-eslint/no-unsafe-member-access': 'off',
      '@typescript-eslint/no-unsafe-assignment': 'off',
      '@typescript-eslint/no-unsafe-call': 'off',
      '@typescript-eslint/no-unsafe-argument': 'off',
      '@typescript-eslint/no-unsafe-return': 'off',
      '@typescript-eslint/no-explicit-any': 'off',
    },
  },
  {
    files: ['frontend/**/*.{ts,tsx}'],
    plugins: { 'react-hooks': reactHooks },
    rules: {
      // The rules of hooks and complete effect dependencies. The plugin's React Compiler diagnostics
      // (purity, refs, set-state-in-effect, use-memo, incompatible-library) are left out: the app does not
      // run the compiler, and resetting state when a route parameter changes is written as an effect here.
      'react-hooks/rules-of-hooks': 'error',
      'react-hooks/exhaustive-deps': 'error',
      'no-restricted-imports': [
        'error',
        { patterns: [{ group: ['**/backend/**', '**/db/**'], message: 'The front end talks to the back end over HTTP only.' }] },
      ],
    },
  },
  {
    files: ['shared/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        { patterns: [{ group: ['**/backend/**', '**/frontend/**', '**/db/**', '@/*'], message: 'shared/ is used by both sides and imports neither.' }] },
      ],
    },
  },
  {
    files: ['backend/**/*.routes.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        { patterns: [{ group: ['**/db/database*', 'kysely', 'pg'], message: 'Routes call services; repositories hold the SQL.' }] },
      ],
    },
  },
  {
    // Routes parse, authorise, call a service and respond; the SQL and its transactions live in services and repositories.
    files: ['backend/**/*.routes.ts'],
    rules: {
      'no-restricted-syntax': [
        'error',
        {
          selector: 'CallExpression[callee.property.name=/^(selectFrom|insertInto|updateTable|deleteFrom|transaction)$/]',
          message: 'Routes call services; repositories hold the SQL and services the transactions.',
        },
        {
          selector: "TaggedTemplateExpression[tag.name='sql'], CallExpression[callee.object.name='sql']",
          message: 'Routes call services; repositories hold the SQL.',
        },
      ],
    },
  },
  {
    files: ['**/*.js'],
    ...tseslint.configs.disableTypeChecked,
  },
);
