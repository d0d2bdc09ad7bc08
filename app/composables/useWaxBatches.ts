/** The wax batches page: every batch with its yield, which one is open for editing, and `done` after a save. */
export async function useWaxBatches() {
  const { data: batches, refresh } = await useFetch('/api/workshop/batches', { key: 'workshop-batches' })
  const editing = ref<number | null>(null)
  const saved = ref('')

  async function done(code: string, how: string) {
    editing.value = null
    saved.value = `Batch ${code} ${how}.`
    await refresh()
  }

  return { batches, editing, saved, done }
}

export type WaxBatchView = NonNullable<Awaited<ReturnType<typeof useWaxBatches>>['batches']['value']>[number]
