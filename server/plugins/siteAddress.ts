// One setting names the shop's public address: NUXT_SITE_URL. The pages read it as
// `runtimeConfig.public.siteUrl` (absolute links for search engines), so each request's copy of the
// runtime config takes it from the server's setting; NUXT_PUBLIC_SITE_URL is not a second setting.
export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('request', (event) => {
    const config = useRuntimeConfig(event)
    config.public.siteUrl = String(config.siteUrl).replace(/\/+$/, '')
  })
})
