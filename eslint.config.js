// Lint rules for the whole project. Type-aware rules need the TypeScript project, so every
// linted file is in tsconfig.json's include list.
import js from '@eslint/js';
import prettier from 'eslint-config-prettier';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', 'coverage/**', 'bin/**', 'bench/data/**', 'eslint.config.js'] },
  js.configs.recommended,
  ...tseslint.configs.recommendedTypeChecked,
  {
    languageOptions: {
      parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname },
    },
    rules: {
      '@typescript-eslint/no-floating-promises': 'error',
      '@typescript-eslint/no-explicit-any': 'error',
      '@typescript-eslint/consistent-type-imports': ['error', { fixStyle: 'inline-type-imports' }],
      eqeqeq: ['error', 'always'],
      // `_name` marks a binding kept on purpose; a rest sibling drops a field from a copy.
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_', ignoreRestSiblings: true },
      ],
    },
  },
  {
    // Plain JavaScript (fixture generators run by hand with node): no TypeScript project to type-check against.
    ...tseslint.configs.disableTypeChecked,
    files: ['**/*.mjs'],
    languageOptions: { ...tseslint.configs.disableTypeChecked.languageOptions, globals: { URL: 'readonly' } },
  },
  prettier,
);
