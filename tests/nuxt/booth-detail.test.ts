import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h, nextTick } from 'vue'
import { flushPromises } from '@vue/test-utils'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import { getQuery } from 'h3'
import BoothPage from '~/pages/booths/[id].vue'
import type { ChartSeries } from '~/composables/charts'
import { DEFAULT_UNITS } from '~/composables/units'
import { useBoothsStore } from '~/stores/booths'
import { useSessionStore } from '~/stores/session'
import { FakeEventSource } from './fake-event-source'
import { booth, reading, user } from './fixtures'

// ECharts needs a real canvas: the chart is replaced by a stub that shows what it was given.
const ChartStub = defineComponent({
  name: 'ChartStub',
  props: ['title', 'unit', 'series', 'markers', 'from', 'to', 'decimals', 'group', 'loading', 'summary'],
  setup(props) {
    return () => h('div', { 'data-testid': 'chart', 'data-title': props.title, 'data-unit': props.unit }, props.title)
  },
})

const T0 = Date.now() - 60_000
let readingsQuery: Record<string, unknown> | null = null

registerEndpoint('/api/booths', () => ({ booths: [booth()] }))
registerEndpoint('/api/booths/1/readings', (event) => {
  readingsQuery = getQuery(event)
  return {
    boothId: 1,
    from: new Date(T0 - 3_600_000).toISOString(),
    to: new Date(T0).toISOString(),
    resolution: 'raw',
    bucketSeconds: 1,
    count: 2,
    t: [new Date(T0 - 1_000).toISOString(), new Date(T0).toISOString()],
    series: { airTempC: [20, 21], panelTempC: [19, null], dewPointC: [10, 10], rhPct: [50, 51], airflowMps: [0.4, 0.41], boothDpPa: [6, 6.5], intakeFilterDpPa: [90, 95], exhaustFilterDpPa: [130, 140], dewPointMarginC: [9, 9] },
  }
})

async function mountPage() {
  const w = await mountSuspended(BoothPage, { route: '/booths/1', global: { stubs: { ChartsTimeSeriesChart: ChartStub } } })
  await flushPromises()
  await new Promise((r) => setTimeout(r, 20))
  await flushPromises()
  return w
}

const chart = (w: Awaited<ReturnType<typeof mountPage>>, title: string) => w.findAllComponents(ChartStub).find((c) => c.props('title') === title)!

describe('booth detail page', () => {
  beforeEach(() => {
    FakeEventSource.reset()
    vi.stubGlobal('EventSource', FakeEventSource)
    const s = useSessionStore()
    s.setUser(user())
    s.setUnits({ ...DEFAULT_UNITS })
    useBoothsStore().clear()
  })
  afterEach(() => vi.unstubAllGlobals())

  it('loads the last hour and charts it in the user units', async () => {
    useSessionStore().setUnits({ temperature: 'F' })
    const w = await mountPage()
    expect(w.find('h1').text()).toBe('Booth 1')
    expect(readingsQuery).toBeTruthy()
    const span = Date.parse(String(readingsQuery!.to)) - Date.parse(String(readingsQuery!.from))
    expect(span).toBe(3_600_000)

    const titles = w.findAllComponents(ChartStub).map((c) => c.props('title'))
    expect(titles).toEqual(['Temperatures', 'Relative humidity', 'Airflow', 'Booth pressure', 'Filter pressure drop'])
    const temps = chart(w, 'Temperatures')
    expect(temps.props('unit')).toBe('°F')
    const [air, panel, dew] = temps.props('series') as ChartSeries[]
    expect(air!.name).toBe('Air')
    expect(air!.data[1]![1]).toBeCloseTo(69.8, 6)
    expect(panel!.data[1]![1]).toBeNull()
    expect(dew!.dashed).toBe(true)
    expect(temps.props('markers')).toEqual([])
    // Live values in the user units too.
    expect(w.text()).toContain('70.5\u00a0°F')
    w.unmount()
  })

  it('extends the charts from the live stream and merges the state into the store', async () => {
    const w = await mountPage()
    const es = FakeEventSource.last()
    expect(es.url).toBe('/api/booths/1/live')
    es.open()
    es.emit('booth', { boothId: 1, reading: reading({ ts: new Date(T0 + 5_000).toISOString(), airTempC: 25 }, 0), mode: 'bake', modeSince: new Date().toISOString(), deviceStatus: 'online', stale: false, serverTime: new Date().toISOString() })
    await nextTick()
    const air = (chart(w, 'Temperatures').props('series') as ChartSeries[])[0]!
    expect(air.data).toHaveLength(3)
    expect(air.data[2]![1]).toBe(25)
    expect(useBoothsStore().byId(1)?.mode).toBe('bake')
    expect(w.text()).toContain('Bake')
    expect(w.text()).toContain('25.0\u00a0°C')
    w.unmount()
    expect(es.readyState).toBe(2)
  })
})
