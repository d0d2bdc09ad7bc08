import type { UserRole } from '#shared/types/auth'

/** Everyone with an account and changing one person's role; `changing` says whose choice waits. */
export async function useWorkshopPeople() {
  const { data: people, refresh } = await useFetch('/api/workshop/users', { key: 'workshop-users' })
  const { busy, errors, submit } = useFormSubmit()
  const saved = ref('')
  // Whose role is being changed, so only that person's choice waits.
  const changing = ref<number | null>(null)

  async function changeRole(id: number, role: UserRole) {
    saved.value = ''
    changing.value = id
    await submit(async () => {
      const person = await $fetch(`/api/workshop/users/${id}`, { method: 'PATCH', body: { role } })
      saved.value = `${person.name} is now a ${person.role}.`
    })
    await refresh()
  }

  return { people, busy, errors, saved, changing, changeRole }
}
