// ESLint with type information (typescript-eslint 8): the rules the house keeps. `npm test` runs it (`npm run lint`).
import js from '@eslint/js';
import tseslint from 'typescript-eslint';

const node = {
  process: 'readonly',
  console: 'readonly',
  URL: 'readonly',
  Buffer: 'readonly',
  setTimeout: 'readonly',
  clearTimeout: 'readonly',
};

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', 'tests/e2e/out/**', 'coverage/**'] },
  js.configs.recommended,
  { files: ['**/*.mjs', '**/*.js'], languageOptions: { globals: node } },
  ...tseslint.configs.recommended.map((c) => ({ ...c, files: ['**/*.ts'] })),
  {
    files: ['**/*.ts'],
    languageOptions: { parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname } },
    rules: {
      // TypeScript itself reports undefined names (typescript-eslint's advice for TS files).
      'no-undef': 'off',
      '@typescript-eslint/no-floating-promises': 'error',
      '@typescript-eslint/no-misused-promises': ['error', { checksVoidReturn: { arguments: false } }],
      '@typescript-eslint/switch-exhaustiveness-check': ['error', { considerDefaultExhaustiveForUnions: true }],
      '@typescript-eslint/consistent-type-imports': ['error', { fixStyle: 'inline-type-imports' }],
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_', destructuredArrayIgnorePattern: '^_', ignoreRestSiblings: true },
      ],
    },
  },
  {
    rules: {
      'no-nested-ternary': 'error',
      // A variable a closure reads before it is set (a handler wired before the thing it calls exists).
      'prefer-const': ['error', { ignoreReadBeforeAssign: true }],
      'no-sequences': ['error', { allowInParentheses: false }],
      // Escaping and CSV code strips control characters on purpose.
      'no-control-regex': 'off',
      'max-len': ['error', { code: 140, ignoreUrls: true, ignoreRegExpLiterals: true, ignoreStrings: true, ignoreTemplateLiterals: true }],
    },
  },
  // Tests may reach into untyped JSON answers.
  { files: ['tests/**/*.ts'], rules: { '@typescript-eslint/no-explicit-any': 'off' } },
);
