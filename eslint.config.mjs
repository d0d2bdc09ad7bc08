import withNuxt from './.nuxt/eslint.config.mjs'

// Node 20 lacks Object.groupBy, which the Nuxt ESLint config composer calls when ESLint resolves it.
if (!Object.groupBy) {
  Object.groupBy = (items, keyOf) => {
    const groups = Object.create(null)
    let index = 0
    for (const item of items) (groups[keyOf(item, index++)] ??= []).push(item)
    return groups
  }
}

export default withNuxt({
  ignores: ['drizzle/**', '.data/**', 'backups/**', 'tests/browser/report/**'],
}, {
  // Tests read JSON answers of many shapes.
  files: ['tests/**'],
  rules: { '@typescript-eslint/no-explicit-any': 'off' },
})
