import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import globals from 'globals';

const restrict = (patterns) => ({ 'no-restricted-imports': ['error', { patterns }] });

export default tseslint.config(
  { ignores: ['node_modules/**', 'dist/**', '.data/**', '.expo/**', 'test-artifacts/**', 'bench-results/**', 'tmp/**', 'expo-env.d.ts'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/no-require-imports': 'off',
      'no-console': 'off',
    },
  },
  // Imports flow one way: app -> components -> hooks -> shared; server -> shared.
  { files: ['shared/**'], rules: restrict([{ group: ['**/server/**', '**/components/**', '**/hooks/**', '**/app/**', '@/server/*', '@/components/*', '@/hooks/*', '@/app/*', 'react', 'react-native', 'express', 'sequelize'], message: 'shared/ imports nothing but zod and other shared/ files.' }]) },
  { files: ['server/**'], rules: restrict([{ group: ['**/components/**', '**/hooks/**', '**/app/**', '@/components/*', '@/hooks/*', '@/app/*', 'react', 'react-native'], message: 'The server never imports the client.' }]) },
  { files: ['app/**', 'components/**', 'hooks/**'], rules: restrict([{ group: ['**/server/**', '@/server/*', 'express', 'sequelize', 'pg'], message: 'The client never imports the server.' }]) },
  { files: ['components/ui/**'], rules: restrict([{ group: ['**/hooks/queries/**', '@/hooks/queries/*', '**/server/**'], message: 'components/ui holds primitives without data hooks.' }]) },
  { files: ['tests/**'], rules: { '@typescript-eslint/no-non-null-assertion': 'off' } },
);
