/**
 * One ticket's page data: the ticket (a 404 when there is none), the recorders to choose from for the
 * cut, the stages its kind goes through, whether its certificate exists, and `changed` to reload it
 * with the blanks it may take.
 */
export async function useTicketDossier(id: number) {
  const key = `workshop-ticket-${id}`
  // Both requests start before either is awaited: after an await a composable has lost the Nuxt context.
  const ticketRequest = useFetch(`/api/workshop/tickets/${id}`, { key })
  const recordersRequest = useFetch('/api/workshop/recorders', { key: 'workshop-recorders' })
  const { data: ticket, error } = ticketRequest
  const { data: recorderList } = recordersRequest

  async function changed() {
    await Promise.all([refreshNuxtData(key), refreshNuxtData(`ticket-${id}-blanks`)])
  }

  const stagePath = computed(() => ticket.value?.kind === 'custom'
    ? ticketStages
    : ticketStages.filter(stage => stage !== 'proof_sent' && stage !== 'approved'))
  const certified = computed(() => Boolean(ticket.value && ticket.value.cutAt && ['cut', 'proof_sent', 'approved', 'to_dispatch', 'done'].includes(ticket.value.stage)))
  const recorderChoices = computed(() => (recorderList.value?.recorders ?? []).map(recorder => ({ id: recorder.id, name: recorder.name, inService: recorder.inService, rank: recorder.rank })))

  await Promise.all([ticketRequest, recordersRequest])
  if (error.value) throw createError({ statusCode: 404, statusMessage: 'No such ticket.', fatal: true })
  return { ticket, stagePath, certified, recorderChoices, changed }
}

export type TicketDossierView = NonNullable<Awaited<ReturnType<typeof useTicketDossier>>['ticket']['value']>
