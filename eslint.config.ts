// ESLint: the JavaScript, TypeScript and Vue recommended rules; layout is Prettier's job (eslint-config-prettier).
import js from '@eslint/js'
import { vueTsConfigs, withVueTs } from '@vue/eslint-config-typescript'
import prettier from 'eslint-config-prettier/flat'
import pluginVue from 'eslint-plugin-vue'
import globals from 'globals'

export default withVueTs(
  { rootDir: import.meta.dirname },
  { name: 'lineweight/ignores', ignores: ['dist/', '.data/', '.test-artifacts/', 'coverage/', 'lab/', 'bench/results/', 'templates/model-v1/', 'templates/observed-v1/', 'tests/fixtures/'] },
  { name: 'lineweight/files', files: ['**/*.{ts,mts,vue,mjs}'] },
  js.configs.recommended,
  pluginVue.configs['flat/recommended'],
  vueTsConfigs.recommended,
  { name: 'lineweight/globals', languageOptions: { globals: { ...globals.node, ...globals.browser } } },
  {
    name: 'lineweight/rules',
    rules: {
      // A leading underscore marks what is left out on purpose: `{ lines: _l, ...rest }`, Express's four-argument error handler.
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrorsIgnorePattern: '^_', destructuredArrayIgnorePattern: '^_' }],
      // `declare global { namespace Express … }` is how Express's Request type is extended.
      '@typescript-eslint/no-namespace': ['error', { allowDeclarations: true }],
      // Input checks match control characters on purpose, to refuse or strip them.
      'no-control-regex': 'off',
    },
  },
  prettier,
)
