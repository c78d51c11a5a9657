import { onBeforeUnmount, ref } from 'vue'

/** A side-panel width that fits: `max` px on a laptop, the whole screen on a phone. */
export function useDrawerWidth(max = 480) {
  const width = ref(Math.min(max, window.innerWidth))
  const update = () => {
    width.value = Math.min(max, window.innerWidth)
  }
  window.addEventListener('resize', update)
  onBeforeUnmount(() => window.removeEventListener('resize', update))
  return width
}
