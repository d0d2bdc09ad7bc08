/**
 * One recorder's page data: the recorder with its test cuts (a 404 when there is none), the two
 * series of its noise over time with a sentence saying the same for a screen reader, and `refresh`.
 */
export async function useRecorderDetail(id: number) {
  const key = `workshop-recorder-${id}`
  // Before the await: a composable loses the component's context after one.
  const { day, count } = useUnits()
  const { data: detail, error } = await useFetch(`/api/workshop/recorders/${id}`, { key })
  if (error.value) throw createError({ statusCode: 404, statusMessage: 'No such recorder.', fatal: true })
  const refresh = () => refreshNuxtData(key)

  const series = computed(() => {
    const cuts = detail.value?.cuts ?? []
    return [
      { label: 'A-weighted level', unit: 'dBFS', axis: 'left' as const, colour: '#1d5a45', points: cuts.map(cut => ({ x: new Date(cut.cutAt).getTime(), y: cut.aWeightedDbfs })) },
      { label: 'Clicks per minute', unit: '/min', axis: 'right' as const, colour: '#8d6407', dashed: true, points: cuts.map(cut => ({ x: new Date(cut.cutAt).getTime(), y: cut.clicksPerMinute })) },
    ]
  })
  const summary = computed(() => {
    const cuts = detail.value?.cuts ?? []
    if (cuts.length === 0) return 'No test cuts yet.'
    const first = cuts[0]!
    const last = cuts.at(-1)!
    return `${count(cuts.length, 'test cut')} from ${day(first.cutAt)} to ${day(last.cutAt)}; level from ${first.aWeightedDbfs.toFixed(1)} to ${last.aWeightedDbfs.toFixed(1)} dBFS A-weighted, clicks from ${first.clicksPerMinute.toFixed(1)} to ${last.clicksPerMinute.toFixed(1)} a minute.`
  })

  return { detail, refresh, series, summary }
}

export type RecorderDetailView = NonNullable<Awaited<ReturnType<typeof useRecorderDetail>>['detail']['value']>
