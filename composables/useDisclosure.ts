import type { Ref } from 'vue'

/**
 * Open/closed state for a menu or panel that closes on Escape (returning focus to its button),
 * on a click outside `root`, and on navigation.
 */
export function useDisclosure(root: Ref<HTMLElement | null>, trigger?: Ref<HTMLElement | null>) {
  const open = ref(false)
  const route = useRoute()

  function close(returnFocus = false) {
    if (!open.value) return
    open.value = false
    if (returnFocus) trigger?.value?.focus()
  }
  function toggle() {
    open.value = !open.value
  }
  function onPointer(event: Event) {
    if (open.value && root.value && !root.value.contains(event.target as Node)) close()
  }
  function onKey(event: KeyboardEvent) {
    if (event.key === 'Escape' && open.value) close(true)
  }

  watch(() => route.fullPath, () => close())
  onMounted(() => {
    document.addEventListener('pointerdown', onPointer)
    document.addEventListener('keydown', onKey)
  })
  onBeforeUnmount(() => {
    document.removeEventListener('pointerdown', onPointer)
    document.removeEventListener('keydown', onKey)
  })

  return { open, close, toggle }
}
