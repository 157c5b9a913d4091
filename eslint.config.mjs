import js from '@eslint/js';
import reactHooks from 'eslint-plugin-react-hooks';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  { ignores: ['dist/**', 'build/**', 'node_modules/**', 'data/**', 'uploads/**', '.expo/**', 'db/migrations/**', 'expo-env.d.ts'] },
  js.configs.recommended,
  ...tseslint.configs.recommendedTypeChecked,
  {
    languageOptions: {
      parserOptions: { projectService: { allowDefaultProject: ['*.mjs', '*.js'] }, tsconfigRootDir: import.meta.dirname },
    },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/no-require-imports': 'off',
      '@typescript-eslint/consistent-type-imports': ['error', { fixStyle: 'inline-type-imports' }],
      '@typescript-eslint/no-explicit-any': 'error',
      '@typescript-eslint/no-misused-promises': ['error', { checksVoidReturn: { arguments: false, attributes: false } }],
      'no-empty': ['error', { allowEmptyCatch: false }],
    },
  },
  {
    files: ['app/**/*.tsx', 'components/**/*.tsx', 'hooks/**/*.{ts,tsx}'],
    plugins: { 'react-hooks': reactHooks },
    rules: { ...reactHooks.configs.recommended.rules },
  },
  {
    // The client never reaches into the server or the database.
    files: ['app/**', 'components/**', 'hooks/**'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['@/server/*', '@/db/*', '**/server/**', '**/db/**'],
              message: 'The app talks to the server only through hooks/api.ts.',
            },
          ],
        },
      ],
    },
  },
  {
    // lib/ is shared by browser and server: no React, Node, Express or Drizzle.
    files: ['lib/**'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: [
                'react',
                'react-native',
                'express',
                'drizzle-orm',
                'drizzle-orm/*',
                'node:*',
                '@/server/*',
                '@/db/*',
                '@/hooks/*',
                '@/components/*',
              ],
              message: 'lib/ is shared by client and server.',
            },
          ],
        },
      ],
    },
  },
  {
    // supertest bodies are untyped JSON; tests assert on their shape instead.
    files: ['tests/**'],
    rules: {
      '@typescript-eslint/no-unsafe-assignment': 'off',
      '@typescript-eslint/no-unsafe-member-access': 'off',
      '@typescript-eslint/no-unsafe-call': 'off',
      '@typescript-eslint/no-unsafe-argument': 'off',
      '@typescript-eslint/no-unsafe-return': 'off',
      'no-control-regex': 'off',
    },
  },
  { files: ['*.mjs', '*.js', '*.config.*'], ...tseslint.configs.disableTypeChecked },
);
