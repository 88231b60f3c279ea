import { onBeforeUnmount, onMounted } from 'vue'
import { useBoothsStore } from '~/stores/booths'

/** Keeps the all-booths live stream open while the calling component is mounted. */
export function useLiveBooths() {
  const booths = useBoothsStore()
  onMounted(() => booths.retain())
  onBeforeUnmount(() => booths.release())
  return booths
}
