import { resolve, sep } from 'node:path'
import type { Nitro, NitroConfig } from 'nitropack'
import type { GetManualChunk, OutputOptions, RollupOptions } from 'rollup'

// The engine worker (server/engines/worker.ts) is a second entry of the server bundle, written to
// .output/server/workers/engines.mjs, so that server/utils/engines.ts finds it next to index.mjs.
// The code it shares with the server (shared/, server/engines/) goes into a chunk of its own:
// left to Rollup it would land in Nitro's runtime chunk, and importing that in a worker would
// start a second server. Nitro's dev server bundles into one file; there the engines run inline.
function addEngineWorker(nitro: Nitro) {
  if (nitro.options.dev) return
  const root = nitro.options.rootDir
  const engineCode = [resolve(root, 'shared') + sep, resolve(root, 'server/engines') + sep]
  const isEngineCode = (id: string) => engineCode.some((dir) => id.startsWith(dir)) && !id.endsWith(`${sep}pool.ts`)
  nitro.hooks.hook('rollup:before', (_nitro, config: RollupOptions) => {
    const output = config.output as OutputOptions
    const nitroChunks = output.manualChunks as GetManualChunk | undefined
    output.manualChunks = (id, meta) => (isEngineCode(id) ? 'engines' : nitroChunks?.(id, meta))
    config.plugins = [...(Array.isArray(config.plugins) ? config.plugins : [config.plugins]), {
      name: 'halocline-engine-worker',
      buildStart() {
        this.emitFile({ type: 'chunk', id: resolve(root, 'server/engines/worker.ts'), fileName: 'workers/engines.mjs' })
      },
    }]
  })
}

// The server auto-imports only server/utils (Nitro adds it itself), the small cross-cutting
// helpers every route uses. Nuxt would also scan shared/utils and shared/types for the server, a
// few hundred names in one namespace: server code imports those, and the domain services under
// server/services, explicitly. The app keeps auto-importing shared/.
function serverUtilsOnly(config: NitroConfig) {
  if (!config.imports) return
  const shared = resolve(config.rootDir ?? '.', 'shared') + sep
  config.imports.dirs = (config.imports.dirs ?? []).filter((dir) => typeof dir !== 'string' || !resolve(dir).startsWith(shared))
}

// Nuxt hints every dynamic import of a rendered page as a prefetch, so a lazy chart component
// (components/**/*Chart.vue, `<Lazy…>`) had the browser fetch chart.js (54 kB) right after the
// forecast or the upload page loaded, chart or not. Its code and what it imports are fetched when
// the chart renders (a page that imports them statically still preloads them); what the entry and
// the layouts load is prefetched as before.
interface ClientChunk {
  imports?: string[]
  dynamicImports?: string[]
  isEntry?: boolean
  isDynamicEntry?: boolean
  prefetch?: boolean
}
type ClientManifest = Record<string, ClientChunk>

function chartsWhenDrawn(manifest: ClientManifest) {
  const reach = (ids: string[], into = new Set<string>()) => {
    for (const id of ids) {
      if (into.has(id) || !manifest[id]) continue
      into.add(id)
      reach(manifest[id].imports ?? [], into)
    }
    return into
  }
  // The entry's dynamic imports also list every page here (Nuxt drops those after this hook): only
  // the layouts among them are prefetched.
  const entries = Object.keys(manifest).filter((id) => manifest[id]!.isEntry)
  const layouts = entries.flatMap((id) => manifest[id]!.dynamicImports ?? []).filter((id) => id.startsWith('layouts/'))
  const always = reach([...entries, ...layouts])
  const charts = Object.keys(manifest).filter((id) => manifest[id]!.isDynamicEntry && /Chart\.vue$/.test(id))
  for (const id of reach(charts)) if (!always.has(id)) manifest[id]!.prefetch = false
}

// Several builds can live side by side (parallel work, benchmarks): HALOCLINE_BUILD_TAG=x
// builds into .nuxt-x and .output-x instead of .nuxt and .output.
const tag = process.env.HALOCLINE_BUILD_TAG?.replace(/[^\w-]/g, '')

// Root-as-source layout: Nuxt 4 would switch to app/ as soon as that folder exists.
export default defineNuxtConfig({
  compatibilityDate: '2026-11-01',
  srcDir: '.',
  buildDir: tag ? `.nuxt-${tag}` : '.nuxt',
  nitro: {
    output: { dir: tag ? `.output-${tag}` : '.output' },
    // Build files are compressed once here (brotli at its best level, gzip), and Nitro serves the
    // variant the request accepts with Content-Encoding and Vary; dynamic answers are compressed
    // by server/middleware/0.compression.ts.
    compressPublicAssets: { gzip: true, brotli: true },
    // /_nuxt/ (hashed names) gets `public, max-age=31536000, immutable` from Nitro; the unhashed
    // files of public/ may be kept a day.
    routeRules: { '/favicon.svg': { headers: { 'cache-control': 'public, max-age=86400' } } },
  },
  experimental: {
    // A link fetches its page's code when the pointer or focus reaches it, not as soon as it
    // scrolls into view: a home page with a dozen links would otherwise fetch a dozen pages'
    // code (openchemlib and chart.js among them) on every cold load.
    defaults: { nuxtLink: { prefetchOn: { visibility: false, interaction: true } } },
  },
  devtools: { enabled: false },
  telemetry: false,
  modules: ['@nuxtjs/tailwindcss', '@pinia/nuxt', '@vueuse/nuxt', 'nuxt-auth-utils', '@nuxt/eslint'],
  // Lint only (eslint.config.mjs, `npm run lint`, run by npm test): the stylistic options say how
  // the code already reads, so that `eslint --fix` changes layout, not habits.
  eslint: {
    config: {
      stylistic: {
        indent: 2,
        quotes: 'single',
        semi: false,
        commaDangle: 'always-multiline',
        braceStyle: '1tbs',
        arrowParens: true,
        blockSpacing: true,
        quoteProps: 'consistent-as-needed',
      },
    },
  },
  css: ['~/assets/css/main.css'],
  // main.css holds the @tailwind layers; without this the module injects a second copy.
  tailwindcss: { cssPath: '~/assets/css/main.css' },
  app: {
    head: {
      htmlAttrs: { lang: 'en' },
      title: 'Halocline',
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1' },
        { name: 'description', content: 'Halogenation practicals: schedule, GC results, class selectivity, stockroom.' },
      ],
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' }],
    },
  },
  runtimeConfig: {
    databaseUrl: 'postgres://halocline@127.0.0.1:54329/halocline',
    smtp: {
      host: '127.0.0.1',
      port: 2525,
      secure: false,
      ignoreTls: true,
      user: '',
      pass: '',
      from: 'Halocline <no-reply@halocline.local>',
    },
    mail: {
      retryLimit: 8,
      retryDelaySeconds: 30,
      pollSeconds: 2,
      // Messages fetched and sent side by side; the job's expiry covers one delivery, not a queue.
      batchSize: 5,
      // How long the write that records a delivery is retried through a database blip.
      recordRetrySeconds: 15,
      // How often a server looks for messages left by a server process that died (and how long
      // its own presence must have lasted before it judges others): after a kill -9 and a
      // restart, held messages go out about this long after the new process is up.
      sweepSeconds: 5,
      // pg-boss maintenance: jobs past their expiry go back to the queue.
      maintenanceSeconds: 30,
    },
    // How long a process trusts its copy of an account's session version; a logout or password
    // change made through another process takes effect here within this time.
    sessionVersionCacheSeconds: 3,
    // Only when a trusted proxy sets X-Forwarded-For; otherwise a client could pick its own address.
    trustProxy: false,
    // Sign-in throttle (server/utils/throttle.ts): failed or unfinished attempts per account and
    // per address in a sliding window; NUXT_SIGN_IN_ACCOUNT_LIMIT etc. at run time.
    signIn: { windowMinutes: 15, accountLimit: 10, addressLimit: 100 },
    // Campus sign-in over OpenID Connect (server/services/campus-sign-in): off while the issuer or
    // the client id is empty. NUXT_CAMPUS_ISSUER, NUXT_CAMPUS_CLIENT_ID … at run time.
    campus: {
      issuer: '',
      clientId: '',
      clientSecret: '',
      idClaim: 'campus_id',
      scopes: 'openid email profile',
      buttonLabel: 'Sign in with your campus account',
      helpContact: '',
      timeoutSeconds: 8,
      clockLeewaySeconds: 60,
    },
    // NUXT_PASSWORD_SIGN_IN_MODE=off leaves password sign-in only to the comma-separated e-mails in
    // NUXT_PASSWORD_SIGN_IN_BREAK_GLASS (an administrator who must get in when the provider is down).
    passwordSignIn: { mode: 'on', breakGlass: '' },
    demoMailDir: '',
    session: {
      // __Host- pins the cookie to this exact origin over HTTPS (browsers also accept it on
      // loopback); the dev server keeps a plain name.
      name: process.env.NODE_ENV === 'production' ? '__Host-halocline' : 'halocline-session',
      // Never baked into the build: the server reads NUXT_SESSION_PASSWORD when it starts.
      password: '',
      sessionHeader: false,
      maxAge: 60 * 60 * 12,
      cookie: { sameSite: 'lax', secure: true, httpOnly: true },
    },
    // Worker threads for the engines (server/utils/engines.ts): threads 0 means one per core but
    // one; times in ms.
    engines: { threads: 0, maxQueue: 32, taskTimeoutMs: 15_000, queueTimeoutMs: 30_000 },
    // A Server-Timing header on uploads (server/utils/server-timing.ts); npm run bench sets it.
    serverTiming: false,
    public: {
      demo: false,
      appUrl: 'http://127.0.0.1:3000',
    },
  },
  typescript: { strict: true },
  hooks: {
    // Our handler runs first (turns "database unreachable" into 503), then Nuxt's own renders it.
    'nitro:config'(config) {
      const nuxtHandler = config.errorHandler
      config.errorHandler = ['~~/server/error-handler', ...(Array.isArray(nuxtHandler) ? nuxtHandler : nuxtHandler ? [nuxtHandler] : [])]
      serverUtilsOnly(config)
    },
    'nitro:init': addEngineWorker,
    'build:manifest': chartsWhenDrawn,
  },
})
