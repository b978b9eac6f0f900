// @ts-check
// Lint for the whole repository: @nuxt/eslint's flat config (generated in .nuxt by `nuxt prepare`,
// with the stylistic options set in nuxt.config.ts) plus the project rules below. `npm run lint`
// runs it with zero warnings allowed; `npm test` runs it before vitest. Each rule turned off or
// changed here says why: the aim is the house style as it already reads, and every rule that
// finds real bugs left on.
import withNuxt from './.nuxt/eslint.config.mjs'

// A line that is one string and nothing else (a message, a note, a caution, an option label,
// optionally after `key:`, `const X =` or `return`): breaking it would only add a `+`.
const STRING_ONLY_LINE = [
  String.raw`^\s*`,
  // optional lead-in: `key:`, `'key':`, `[key]:`, `x =`, `return`, `+`, `const X: T =`
  String.raw`(?:(?:[\w$.]+|'[^']*'|\[[^\]]*\])\s*[:=]\s*|return\s+|\+\s*`,
  String.raw`|(?:export\s+)?(?:const|let)\s+\w+(?:\s*:\s*[\w<>\[\], ]+)?\s*=\s*)?`,
  // one quoted or template string, then at most `as const`, closing punctuation and a comment
  String.raw`(['"\x60]).*\1\s*(?:as const\s*)?[,;)]*\s*(?:\/\/.*)?$`,
].join('')

export default withNuxt(
  {
    // Build outputs (HALOCLINE_BUILD_TAG makes .nuxt-x and .output-x), test worlds and reports.
    ignores: ['.nuxt*/**', '.output*/**', '.data/**', 'test-results/**', 'coverage/**', 'node_modules/**'],
  },
  {
    rules: {
      // 140 columns. URLs, regular expressions and a line that is one long string stay whole;
      // everything else (code, templates, imports, comments) wraps.
      '@stylistic/max-len': ['error', {
        code: 140,
        ignoreUrls: true,
        ignoreRegExpLiterals: true,
        ignorePattern: STRING_ONLY_LINE,
      }],
      // Trailing commas on multi-line lists, as the preset; but a generic's `<T,>` keeps its comma:
      // in a .vue script it is what tells `<T>` from an element, and --fix would break the parse.
      '@stylistic/comma-dangle': ['error', {
        arrays: 'always-multiline',
        objects: 'always-multiline',
        imports: 'always-multiline',
        exports: 'always-multiline',
        functions: 'always-multiline',
        importAttributes: 'always-multiline',
        dynamicImports: 'always-multiline',
        enums: 'always-multiline',
        tuples: 'always-multiline',
        generics: 'ignore',
      }],
      // A string that holds a single quote is written in double quotes ("Grubbs' test"), never
      // with a backslash.
      '@stylistic/quotes': ['error', 'single', { avoidEscape: true, allowTemplateLiterals: 'always' }],
      // Long type unions and notes start on the line after `=`; `?`, `:`, `&&`, `||` lead the
      // continued line as the preset wants.
      '@stylistic/operator-linebreak': ['error', 'before', { overrides: { '=': 'after' } }],
      // Short callbacks stay on one line (`watch(src, () => { open.value = false })`); line
      // density is bounded by max-len instead.
      '@stylistic/max-statements-per-line': 'off',
      // Form-error records are plain reactive objects keyed by field name; deleting the key is how a
      // field's message goes away.
      '@typescript-eslint/no-dynamic-delete': 'off',
      // The preset hard-codes Stroustrup for Vue files; the code uses `} else {` everywhere.
      'vue/brace-style': ['error', '1tbs', { allowSingleLine: true }],
      // nuxt.config.ts is ordered by topic (layout, build, modules, runtime config, hooks), each
      // key beside the comment that explains it; sorting would scatter them.
      'nuxt/nuxt-config-keys-order': 'off',
      // Templates keep an element's attributes, and a short element's text, on one line
      // (`<BaseButton type="submit" :loading="busy">Save</BaseButton>`): one element, one line,
      // wrapped by hand when it passes 140 columns. The preset would put every attribute and every
      // text on a line of its own (about 3,900 findings today).
      'vue/max-attributes-per-line': 'off',
      'vue/singleline-html-element-content-newline': 'off',
    },
  },
  {
    // Kysely's documented migration signature is `up(db: Kysely<any>)`: a migration is frozen in
    // time and must not import today's Database interface.
    files: ['server/database/migrations/**'],
    rules: { '@typescript-eslint/no-explicit-any': 'off' },
  },
  {
    // A test reads as its title and its fixtures: long titles and fixture text (peak tables,
    // messages a test expects verbatim) stay on their line; the code around them wraps at 140.
    files: ['tests/**'],
    rules: {
      '@stylistic/max-len': ['error', {
        code: 140,
        ignoreUrls: true,
        ignoreRegExpLiterals: true,
        ignoreStrings: true,
        ignoreTemplateLiterals: true,
      }],
    },
  },
)
