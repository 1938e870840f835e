// Lint for correctness only: the recommended sets of ESLint, typescript-eslint and the React hooks
// plugin. Formatting and style are left alone on purpose.
import js from '@eslint/js'
import reactHooks from 'eslint-plugin-react-hooks'
import tseslint from 'typescript-eslint'

export default tseslint.config(
  { ignores: ['build/', '.react-router/', 'node_modules/', 'data/', 'public/', 'tests/.db/', 'tests/.artifacts/'] },
  js.configs.recommended,
  tseslint.configs.recommended,
  {
    files: ['app/**/*.{ts,tsx}'],
    extends: [reactHooks.configs.flat.recommended],
  },
  {
    rules: {
      // `_name` marks a parameter or binding kept for its position or shape.
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none' }],
    },
  },
)
