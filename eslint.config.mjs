// @ts-check
import angular from 'angular-eslint';
import tseslint from 'typescript-eslint';

/** Which part may import which (STYLE.md): kept true by lint, which CI runs. */
const drizzleOnlyInRepositories = {
  name: 'drizzle-orm',
  message: 'Only *.repository.ts files and db/ talk to the database.',
};

export default tseslint.config(
  {
    ignores: [
      'dist/',
      'node_modules/',
      '.angular/',
      '.data/',
      'test-results/',
      'db/migrations/',
      'coverage/',
    ],
  },
  {
    files: ['**/*.ts'],
    extends: [...tseslint.configs.strictTypeChecked, ...tseslint.configs.stylisticTypeChecked],
    languageOptions: {
      parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname },
    },
    rules: {
      '@typescript-eslint/restrict-template-expressions': ['error', { allowNumber: true }],
      '@typescript-eslint/no-extraneous-class': 'off',
      '@typescript-eslint/consistent-type-definitions': 'off',
      // Angular Material takes its options as plain object literals by design.
      '@typescript-eslint/no-unsafe-class-instance-assignment': 'off',
    },
  },
  {
    // Tests poke at response bodies whose shape the assertions themselves check.
    files: ['**/*.spec.ts', '**/*.e2e.ts', 'tests/**/*.ts', 'apps/api/src/testing/**/*.ts'],
    rules: {
      '@typescript-eslint/no-unsafe-member-access': 'off',
      '@typescript-eslint/no-unsafe-assignment': 'off',
      '@typescript-eslint/no-unsafe-argument': 'off',
      '@typescript-eslint/no-unsafe-call': 'off',
      '@typescript-eslint/no-unsafe-return': 'off',
      '@typescript-eslint/no-non-null-assertion': 'off',
      '@typescript-eslint/unbound-method': 'off',
      '@typescript-eslint/require-await': 'off',
    },
  },
  {
    files: ['libs/domain/**/*.ts'],
    rules: {
      '@typescript-eslint/no-restricted-imports': [
        'error',
        {
          patterns: [
            { regex: '^(?!\\.|vitest$)', message: 'libs/domain imports nothing outside itself.' },
          ],
        },
      ],
    },
  },
  {
    // Domain specs check the computations against general-purpose reference libraries.
    files: ['libs/domain/**/*.spec.ts'],
    rules: {
      '@typescript-eslint/no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              regex: '^(?!\\.|vitest$|simple-statistics$|jstat$|fast-check$)',
              message: 'Domain specs may use only reference libraries and fast-check.',
            },
          ],
        },
      ],
    },
  },
  {
    files: ['libs/contracts/**/*.ts'],
    rules: {
      '@typescript-eslint/no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              regex: '^(?!\\.|zod$|@tierscope/domain$|vitest$)',
              message: 'libs/contracts imports only zod and libs/domain.',
            },
          ],
        },
      ],
    },
  },
  {
    // Contract specs may generate their inputs with fast-check (seeded).
    files: ['libs/contracts/**/*.spec.ts'],
    rules: {
      '@typescript-eslint/no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              regex: '^(?!\\.|zod$|@tierscope/domain$|vitest$|fast-check$)',
              message: 'Contract specs import only zod, libs/domain, vitest and fast-check.',
            },
          ],
        },
      ],
    },
  },
  {
    files: ['apps/api/**/*.ts'],
    ignores: ['apps/api/**/*.repository.ts'],
    rules: {
      '@typescript-eslint/no-restricted-imports': [
        'error',
        {
          paths: [drizzleOnlyInRepositories],
          patterns: [
            { group: ['**/apps/web/**', '@tierscope/web'], message: 'Never import another app.' },
          ],
        },
      ],
    },
  },
  {
    files: ['apps/web/**/*.ts', 'simulator/**/*.ts'],
    rules: {
      '@typescript-eslint/no-restricted-imports': [
        'error',
        {
          paths: [drizzleOnlyInRepositories],
          patterns: [
            {
              group: ['@tierscope/db', '@tierscope/db/*', '**/db/**', 'pg'],
              message: 'Only the API talks to the database.',
            },
            { group: ['**/apps/api/**', '@tierscope/api'], message: 'Never import another app.' },
          ],
        },
      ],
    },
  },
  {
    // API specs read the real database directly to check what a route wrote.
    files: ['apps/api/**/*.spec.ts'],
    rules: { '@typescript-eslint/no-restricted-imports': 'off' },
  },
  {
    files: ['apps/web/**/*.ts'],
    extends: [...angular.configs.tsRecommended],
    processor: angular.processInlineTemplates,
    rules: {
      '@angular-eslint/component-selector': [
        'error',
        { type: 'element', prefix: 'ts', style: 'kebab-case' },
      ],
      '@angular-eslint/prefer-on-push-component-change-detection': 'error',
      // Angular's own Validators.required & co. are static functions meant to be passed unbound.
      '@typescript-eslint/unbound-method': 'off',
    },
  },
  {
    files: ['apps/web/**/*.html'],
    extends: [...angular.configs.templateRecommended, ...angular.configs.templateAccessibility],
  },
);
