/**
 * One blank's page data: its dossier (a 404 when no blank has the code), which actions its state
 * allows, the last reading and the test that decides its state, and `done` to show a message and reload.
 */
export async function useBlankDossier(code: string) {
  const key = `workshop-blank-${code}`
  const { data: dossier, error, refresh } = await useFetch(`/api/workshop/blanks/${code}`, { key })
  if (error.value) throw createError({ statusCode: error.value.statusCode ?? 404, statusMessage: error.value.statusCode === 404 ? `No blank has the code ${code}.` : 'The blank could not be loaded.', fatal: true })

  const message = ref('')
  const allowed = (action: BlankAction) => dossier.value ? blankActionRefusal(action, dossier.value.blank.state, dossier.value.holder) === null : false
  const lastReadingIn = computed(() => dossier.value?.reamings.at(-1)?.overhangAfterIn ?? null)
  const latestCurrentTestId = computed(() => dossier.value?.surfaceTests.find(test => test.surface === dossier.value?.blank.currentSurface)?.id ?? null)
  const workDone = computed(() => dossier.value && (['ream', 'shave', 'surfaceTest', 'reshave', 'refit'] as const).every(action => !allowed(action))
    ? blankActionRefusal('reshave', dossier.value.blank.state, dossier.value.holder)
    : null)

  async function done(text: string) {
    message.value = text
    await refresh()
  }

  return { dossier, message, allowed, lastReadingIn, latestCurrentTestId, workDone, done }
}

export type BlankDossierView = NonNullable<Awaited<ReturnType<typeof useBlankDossier>>['dossier']['value']>
