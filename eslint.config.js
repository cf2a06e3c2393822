import js from '@eslint/js';
import pluginVue from 'eslint-plugin-vue';
import { defineConfigWithVueTs, vueTsConfigs } from '@vue/eslint-config-typescript';
import prettier from 'eslint-config-prettier/flat';

export default defineConfigWithVueTs(
  {
    ignores: [
      'dist/**',
      'dist-server*/**',
      'node_modules/**',
      '.data/**',
      'coverage/**',
      'tests/e2e/artifacts/**',
      'scripts/.*.ts',
    ],
  },
  js.configs.recommended,
  pluginVue.configs['flat/recommended'],
  vueTsConfigs.recommended,
  {
    languageOptions: {
      globals: {
        console: 'readonly',
        process: 'readonly',
        URL: 'readonly',
        setTimeout: 'readonly',
        clearTimeout: 'readonly',
        setInterval: 'readonly',
        clearInterval: 'readonly',
        window: 'readonly',
        document: 'readonly',
        fetch: 'readonly',
        Buffer: 'readonly',
      },
    },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      'vue/multi-word-component-names': 'off',
      'vue/max-attributes-per-line': 'off',
      'vue/singleline-html-element-content-newline': 'off',
      'vue/html-self-closing': 'off',
    },
  },
  {
    // The browser's code (and the shared code it bundles) never loads the world's holiday tables:
    // the server lists a calendar's holidays (server/services/holiday-days.ts).
    files: ['src/**/*.{ts,vue}', 'shared/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          paths: [
            { name: 'date-holidays', message: 'Holidays come with the calendars (server/services/holiday-days.ts).' },
          ],
          patterns: [
            {
              group: ['date-holidays/*', 'date-holidays-parser', 'date-holidays-parser/*'],
              message: 'Holidays come with the calendars (server/services/holiday-days.ts).',
            },
          ],
        },
      ],
    },
  },
  // Layout is Prettier's (.prettierrc.json, `npm run format`): the lint rules that would argue with it are off.
  prettier,
);
