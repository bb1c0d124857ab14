import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';
import jsxA11y from 'eslint-plugin-jsx-a11y';
import { importX } from 'eslint-plugin-import-x';
import { createTypeScriptImportResolver } from 'eslint-import-resolver-typescript';
import globals from 'globals';

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', 'data/**', 'test-artifacts/**', 'coverage/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    settings: { 'import-x/resolver-next': [createTypeScriptImportResolver({ project: './tsconfig.json' })] },
    plugins: { 'import-x': importX },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', destructuredArrayIgnorePattern: '^_' }],
      '@typescript-eslint/no-non-null-assertion': 'off',
      'import-x/no-cycle': ['error', { maxDepth: 12 }],
      'import-x/no-restricted-paths': [
        'error',
        {
          zones: [
            // The client never reaches into the server.
            { target: './src', from: './server', message: 'The client must not import server code.' },
            // Shared schemas import only zod and each other, so both sides can load them.
            { target: './src/schemas', from: ['./src/app', './src/features', './src/lib', './src/components'] },
            // Code flows one way: shared pieces -> features -> app.
            { target: ['./src/lib', './src/components', './src/config', './src/utils'], from: ['./src/features', './src/app'] },
            { target: './src/features', from: './src/app' },
            // The server may use the shared schemas and nothing else under src/.
            { target: './server', from: ['./src/app', './src/features', './src/lib', './src/components', './src/config'] },
          ],
        },
      ],
    },
  },
  {
    files: ['src/**/*.{ts,tsx}'],
    plugins: { 'react-hooks': reactHooks, 'jsx-a11y': jsxA11y },
    rules: {
      ...reactHooks.configs.recommended.rules,
      ...jsxA11y.flatConfigs.recommended.rules,
      'react-hooks/incompatible-library': 'off',
    },
  },
  {
    files: ['src/features/**/*.{ts,tsx}'],
    rules: {
      'no-restricted-imports': [
        'error',
        { patterns: [{ regex: '^@/features/(?!.*\\bshared\\b)', message: 'Features never import each other; compose them in src/app/routes.' }] },
      ],
    },
  },
  {
    files: ['tests/**/*.{ts,tsx}'],
    rules: { 'no-restricted-syntax': ['error', { selector: "CallExpression[callee.property.name='only']", message: 'No focused tests.' }, { selector: "CallExpression[callee.property.name='skip']", message: 'No skipped tests.' }] },
  },
);
