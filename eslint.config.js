// ESLint (flat config): ESLint's recommended rules and typescript-eslint's type-checked
// recommended rules for the TypeScript, the same without type information for the few JavaScript
// files, and eslint-config-prettier last (formatting is prettier's job, not the linter's).
// `npm run lint`.
import js from '@eslint/js';
import { defineConfig, globalIgnores } from 'eslint/config';
import prettier from 'eslint-config-prettier/flat';
import globals from 'globals';
import tseslint from 'typescript-eslint';

export default defineConfig(
  globalIgnores(['dist/', 'test-output/', 'node_modules/', 'src/survey/survey-validator.generated.ts']),
  js.configs.recommended,
  tseslint.configs.recommendedTypeChecked,
  {
    languageOptions: {
      parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname },
      globals: globals.node,
    },
    rules: {
      // A leading underscore marks what is unused on purpose (`_end`, `{ fits: _fits, ...rest }`).
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrorsIgnorePattern: '^_' },
      ],
    },
  },
  {
    // Tests read JSON documents (outputs, fixtures, schemas) as `any` and check their shape
    // with expectations: the unsafe-any rules would only ask for casts there.
    files: ['test/**/*.ts'],
    rules: {
      '@typescript-eslint/no-unsafe-assignment': 'off',
      '@typescript-eslint/no-unsafe-member-access': 'off',
      '@typescript-eslint/no-unsafe-argument': 'off',
      '@typescript-eslint/no-unsafe-call': 'off',
      '@typescript-eslint/no-unsafe-return': 'off',
    },
  },
  {
    // Published tables (QUADPACK's Gauss-Kronrod nodes and weights) keep all their digits.
    files: ['src/numerics/quadrature.ts'],
    rules: { 'no-loss-of-precision': 'off' },
  },
  {
    files: ['**/*.js', '**/*.mjs'],
    extends: [tseslint.configs.disableTypeChecked],
  },
  {
    // The program's entry is CommonJS (bin/package.json): it reads its parts with require().
    files: ['bin/*.js'],
    languageOptions: { sourceType: 'commonjs' },
    rules: { '@typescript-eslint/no-require-imports': 'off' },
  },
  prettier,
);
