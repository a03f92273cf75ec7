/**
 * Lint: ESLint's and typescript-eslint's recommended rules (type-aware), React's hooks rules for
 * the client, and the import boundaries that keep the architecture DEVELOPERS.md describes.
 */
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';
import boundaries from 'eslint-plugin-boundaries';
import globals from 'globals';

/** Server folders of the shared kernel: any feature imports them directly. */
const KERNEL = 'server/(http|db|csv|mail|signatures|stats)';
/** Single kernel files that sit in a feature's folder or at the top. */
const KERNEL_FILES = ['server/auth/access.ts', 'server/auth/visibility.ts', 'server/audit/audit.ts', 'server/config.ts', 'server/hooks.ts'];

const feature = { element: { type: 'feature' } };
const otherFeature = { element: { type: 'feature', captured: { feature: '!{{ from.element.captured.feature }}' } } };
const otherClientFeature = { element: { type: 'client-feature', captured: { feature: '!{{ from.element.captured.feature }}' } } };
const file = (categories) => ({ file: { categories } });

const boundaryConfig = {
  files: ['server/**/*.ts', 'client/src/**/*.{ts,tsx}'],
  plugins: { boundaries },
  settings: {
    'import/resolver': { typescript: { project: './tsconfig.json' } },
    'boundaries/elements': [
      { type: 'words', pattern: 'server/words', partialMatch: false },
      { type: 'kernel', pattern: KERNEL, partialMatch: false },
      { type: 'dev', pattern: 'server/dev', partialMatch: false },
      { type: 'feature', pattern: 'server/*', capture: ['feature'], partialMatch: false },
      { type: 'client-shared', pattern: 'client/src/(lib|components)', partialMatch: false },
      { type: 'client-feature', pattern: 'client/src/features/*', capture: ['feature'], partialMatch: false },
      { type: 'client-app', pattern: 'client/src/app', partialMatch: false },
    ],
    'boundaries/files': [
      { category: 'root', pattern: 'server/*.ts' },
      { category: 'kernel', pattern: KERNEL_FILES },
      { category: 'access', pattern: 'server/auth/access.ts' },
      { category: 'http-routes', pattern: 'server/http/routes.ts' },
      { category: 'routes', pattern: '**/*.routes.ts' },
      { category: 'service', pattern: '**/*.service.ts' },
      { category: 'repository', pattern: '**/*.repository.ts' },
      { category: 'schema', pattern: '**/*.schema.ts' },
      { category: 'index', pattern: '**/index.{ts,tsx}' },
    ],
  },
  rules: {
    'boundaries/dependencies': [
      'error',
      {
        default: 'allow',
        checkAllOrigins: true,
        checkInternals: true,
        // A later policy overrides an earlier one for the same import.
        policies: [
          // Server: another feature only through its index.ts (the kernel files inside a feature folder excepted).
          {
            from: [feature, { element: { type: 'dev' } }, file('root')],
            disallow: { to: otherFeature },
            message: 'Import another feature only through its index.ts.',
          },
          { from: [feature, { element: { type: 'dev' } }, file('root')], allow: { to: [file('index'), file('kernel')] } },
          // A schema may import another feature's schema directly: schemas are what the client bundles, and a barrel would pull server code in.
          { from: file('schema'), allow: { to: file('schema') } },
          // Server layering: routes → service → repository.
          {
            from: file('repository'),
            disallow: { to: [file('routes'), file('service')] },
            message: 'A repository never imports a service or routes.',
          },
          {
            from: [feature, { element: { type: ['kernel', 'words', 'dev'] } }],
            disallow: { to: [file('routes'), file('http-routes')] },
            message: 'Only routes files and app.ts import routes and server/http/routes.ts.',
          },
          { from: file('routes'), allow: { to: file('http-routes') } },
          { from: file('index'), allow: { to: file('routes') } },
          {
            from: feature,
            disallow: { to: { module: { origin: 'external', source: 'express' } } },
            message: 'Only routes files speak Express; a service takes an Actor and plain inputs.',
          },
          { from: file('routes'), allow: { to: { module: { origin: 'external', source: 'express' } } } },
          // The kernel knows no feature; the words module reads the codes it words from the shared schemas, as types only.
          {
            from: { element: { type: ['kernel', 'words'] } },
            disallow: { to: feature },
            message: 'The shared kernel imports no feature.',
          },
          { from: { element: { type: ['kernel', 'words'] } }, allow: { to: file(['kernel', 'schema']), dependency: { kind: 'type' } } },
          { from: { element: { type: ['kernel', 'words'] } }, allow: { to: file('kernel') } },
          // Client: shared → features → app.
          {
            from: { element: { type: 'client-shared' } },
            disallow: { to: { element: { type: ['client-feature', 'client-app'] } } },
            message: 'lib/ and components/ import neither features/ nor app/.',
          },
          {
            from: { element: { type: 'client-feature' } },
            disallow: { to: [{ element: { type: 'client-app' } }, otherClientFeature] },
            message: 'A feature never imports app/, and reaches another feature only through its index.ts.',
          },
          { from: { element: { type: 'client-feature' } }, allow: { to: { element: { type: 'client-feature' }, ...file('index') } } },
          // The client takes from the server only the shared schemas, the access rules, the words, and types.
          {
            from: { element: { type: ['client-shared', 'client-feature', 'client-app'] } },
            disallow: { to: [{ element: { type: ['kernel', 'feature', 'dev'] } }, file(['root', 'kernel'])], dependency: { kind: 'value' } },
            message: 'The client imports from server/ only *.schema.ts, server/auth/access.ts, server/words/ or types.',
          },
          {
            from: { element: { type: ['client-shared', 'client-feature', 'client-app'] } },
            allow: { to: [file('schema'), file('access')] },
          },
        ],
      },
    ],
  },
};

export default tseslint.config(
  { ignores: ['node_modules/', 'dist/', 'test-artifacts/', 'bench-results/', '.scratch-*/'] },
  js.configs.recommended,
  tseslint.configs.recommendedTypeChecked,
  {
    languageOptions: { globals: { ...globals.node }, parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname } },
    rules: {
      // Knex rows and supertest bodies are `any` by those libraries' design; typing each through a cast adds noise, not safety.
      '@typescript-eslint/no-unsafe-argument': 'off',
      '@typescript-eslint/no-unsafe-assignment': 'off',
      '@typescript-eslint/no-unsafe-call': 'off',
      '@typescript-eslint/no-unsafe-member-access': 'off',
      '@typescript-eslint/no-unsafe-return': 'off',
      // A leading underscore marks a parameter a signature requires (Express's error handler) or a value deliberately dropped.
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', ignoreRestSiblings: true }],
    },
  },
  { files: ['**/*.js', '**/*.mjs'], extends: [tseslint.configs.disableTypeChecked] },
  { files: ['client/**/*.{ts,tsx}'], ...reactHooks.configs.flat.recommended },
  {
    files: ['client/**/*.{ts,tsx}', 'tests/client/**'],
    rules: {
      // React's event props ignore a handler's returned promise by design; the handlers catch their own errors.
      '@typescript-eslint/no-misused-promises': ['error', { checksVoidReturn: { attributes: false } }],
      // A rule for the React Compiler, which this build does not use (TanStack Table's hook is its example).
      'react-hooks/incompatible-library': 'off',
    },
  },
  { files: ['client/**/*.{ts,tsx}', 'tests/client/**'], languageOptions: { globals: { ...globals.browser } } },
  boundaryConfig,
);
