/** A button's request: pending while it runs, and the server's message (or the lost connection) when it fails. */
export function useAction() {
  const pending = ref(false)
  const problem = ref('')

  async function run(work: () => Promise<unknown>) {
    pending.value = true
    problem.value = ''
    try {
      await work()
    }
    catch (error) {
      problem.value = describeFetchError(error).text
    }
    finally {
      pending.value = false
    }
  }

  return { pending, problem, run }
}
