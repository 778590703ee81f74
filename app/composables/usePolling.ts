// One way for a page to keep itself current while the worker still owes it something: look
// again every POLL_INTERVAL_MS while `active` holds, stop when it no longer does or the page
// goes. Each look waits for the previous one to finish, so slow answers never pile up.
export const POLL_INTERVAL_MS = 1500

export function usePolling(look: () => Promise<unknown>, active: () => boolean, interval = POLL_INTERVAL_MS) {
  let timer: ReturnType<typeof setTimeout> | undefined
  let stopped = false
  function schedule() {
    if (timer || stopped || !active()) return
    timer = setTimeout(async () => {
      try {
        await look()
      } finally {
        timer = undefined
        schedule()
      }
    }, interval)
  }
  if (import.meta.client) {
    watch(active, (on) => { if (on) schedule() })
    onMounted(schedule)
    onBeforeUnmount(() => {
      stopped = true
      clearTimeout(timer)
    })
  }
  return { schedule }
}
