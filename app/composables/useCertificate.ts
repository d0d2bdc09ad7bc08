import type { InternalApi } from 'nitropack/types'

export type Certificate = InternalApi['/api/certificates/:id']['get']

/**
 * The test certificate of one made cylinder, for its owner, the maker, or a guest with the order's link
 * (the `t` in the address); anything else is a 404 page.
 */
export async function useCertificate() {
  const route = useRoute()
  const id = Number(route.params.id)
  const { data: certificate, error } = await useFetch(`/api/certificates/${id}`, { key: `certificate-${id}`, query: { t: route.query.t } })
  if (error.value || !certificate.value) throw createError({ statusCode: 404, statusMessage: 'No such certificate.', fatal: true })
  return { id, certificate }
}
