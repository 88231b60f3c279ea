import { computed, toValue, type MaybeRefOrGetter } from 'vue'
import type { ChartMarker } from '~/composables/charts'

/**
 * Markers (coats, bakes, alerts) for a booth's charts over a time range. The extension point for
 * the jobs / bakes / alerts work: return their events here as ChartMarker[] and every chart of the
 * booth detail page shows them. Empty until then.
 */
export function useBoothMarkers(boothId: MaybeRefOrGetter<number>, range: MaybeRefOrGetter<{ from: number; to: number }>) {
  return computed<ChartMarker[]>(() => {
    void toValue(boothId)
    void toValue(range)
    return []
  })
}
