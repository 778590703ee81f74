// ESLint: the framework's own flat config (@nuxt/eslint, generated into .nuxt by `nuxt prepare`)
// with its correctness rules. Formatting rules stay off (`stylistic` is not enabled): the code
// keeps one style by review, and a lint run never asks to reformat a file.
import withNuxt from './.nuxt/eslint.config.mjs'

export default withNuxt(
  { ignores: ['drizzle/**', 'test-results/**'] },
  {
    // Tests read JSON answers of every route through one client: their bodies are untyped by
    // nature, and each test asserts the fields it reads.
    files: ['tests/**'],
    rules: { '@typescript-eslint/no-explicit-any': 'off' },
  },
)
