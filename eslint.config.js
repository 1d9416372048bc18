// @ts-check
import pluginVue from 'eslint-plugin-vue';
import { defineConfigWithVueTs, vueTsConfigs } from '@vue/eslint-config-typescript';

// One direction only: src and server never import each other; shared imports neither.
const noServer = { group: ['**/server/**', '../server/*', '../../server/*'], message: 'src/ must not import server/: share code through shared/.' };
const noSrc = { group: ['**/src/**', '@/*', '../src/*', '../../src/*'], message: 'server/ must not import src/: share code through shared/.' };

export default defineConfigWithVueTs(
  { ignores: ['dist/**', 'dist-*/**', 'node_modules/**', '.data/**', 'test-results/**', 'coverage/**'] },
  pluginVue.configs['flat/essential'],
  vueTsConfigs.recommended,
  {
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
    },
  },
  { files: ['src/**/*.{ts,vue}'], rules: { 'no-restricted-imports': ['error', { patterns: [noServer] }] } },
  { files: ['server/**/*.ts'], rules: { 'no-restricted-imports': ['error', { patterns: [noSrc] }] } },
  {
    files: ['shared/**/*.ts'],
    rules: {
      'no-restricted-imports': ['error', {
        patterns: [noServer, noSrc, { group: ['node:*'], message: 'shared/ runs in the browser too: no Node APIs.' }],
      }],
    },
  },
);
