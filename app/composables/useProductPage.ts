/**
 * One cylinder of the shop by the address's slug (a 404 page when there is none), its title, description
 * and schema.org Product for search engines, and adding it to the cart.
 */
export async function useProductPage() {
  const route = useRoute()
  const slug = computed(() => String(route.params.slug))
  // Everything that needs the app's context is set up before the first await, after which it is gone.
  const config = useRuntimeConfig()
  const site = config.public.siteUrl || ''
  const cart = useCartStore()
  const added = ref('')
  const request = useFetch(() => `/api/shop/products/${slug.value}`, { key: `product-${slug.value}` })
  const { data: product, error } = request

  useHead(() => ({
    title: product.value?.title ?? 'Cylinder',
    meta: product.value ? [{ name: 'description', content: product.value.description.slice(0, 160) }] : [],
    // The first photo is the page's largest picture: asked for before the scripts, not after them.
    link: product.value?.photoUrls[0] ? [{ rel: 'preload', as: 'image', href: product.value.photoUrls[0], fetchpriority: 'high', tagPriority: 'high' }] : [],
    script: product.value
      ? [{
          type: 'application/ld+json',
          innerHTML: JSON.stringify({
            '@context': 'https://schema.org',
            '@type': 'Product',
            'name': product.value.title,
            'description': product.value.description,
            'image': product.value.photoUrls.map(url => `${site}${url}`),
            'sku': product.value.slug,
            'material': product.value.material,
            'offers': {
              '@type': 'Offer',
              'price': (product.value.priceMinor / 100).toFixed(2),
              'priceCurrency': product.value.currency,
              'availability': product.value.stock > 0 ? 'https://schema.org/InStock' : 'https://schema.org/OutOfStock',
              'url': `${site}/cylinders/${product.value.slug}`,
            },
          }),
        }]
      : [],
  }))
  await request
  if (error.value) throw createError({ statusCode: 404, statusMessage: 'No such cylinder in the shop.', fatal: true })

  function addToCart(qty: number) {
    if (!product.value) return
    cart.add({
      slug: product.value.slug,
      title: product.value.title,
      seenUnitPriceMinor: product.value.priceMinor,
      currency: product.value.currency,
      format: product.value.format,
      photoUrl: product.value.photoUrls[0] ?? null,
    }, qty)
    added.value = `${qty} × ${product.value.title} added to your cart.`
  }

  return { product, added, addToCart }
}
