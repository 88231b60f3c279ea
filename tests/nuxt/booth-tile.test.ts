import { beforeEach, describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import BoothTile from '~/components/BoothTile.vue'
import { DEFAULT_UNITS } from '~/composables/units'
import { useSessionStore } from '~/stores/session'
import { booth, reading, user } from './fixtures'

const NB = '\u00a0'

async function mountTile(props: Record<string, unknown>, slots?: Record<string, () => unknown>) {
  return mountSuspended(BoothTile, { props: props as never, slots: slots as never, route: false })
}

describe('BoothTile', () => {
  beforeEach(() => {
    const session = useSessionStore()
    session.setUser(user())
    session.setUnits({ ...DEFAULT_UNITS })
  })

  it('shows a fresh reading as live, in SI units by default', async () => {
    const w = await mountTile({ booth: booth() })
    expect(w.attributes('data-state')).toBe('ok')
    expect(w.find('[data-testid="live-state"]').text()).toBe('Live')
    expect(w.find('[data-testid="state-detail"]').exists()).toBe(false)
    expect(w.find('[data-testid="value-air"]').text()).toContain(`21.4${NB}°C`)
    expect(w.find('[data-testid="value-rh"]').text()).toContain(`54${NB}%`)
    expect(w.find('[data-testid="value-panel"]').text()).toContain(`20.8${NB}°C`)
    expect(w.find('[data-testid="value-margin"]').text()).toContain(`+9.0${NB}°C`)
    expect(w.find('[data-testid="value-airflow"]').text()).toContain(`0.41${NB}m/s`)
    // Mode in words (and an icon beside it), with how long it has lasted.
    expect(w.text()).toContain('Spraying')
    expect(w.text()).toContain('for 12 min')
    expect(w.find('[data-mode="spray"] svg').exists()).toBe(true)
    expect(w.text()).not.toContain('Last known values')
    expect(w.find('a').attributes('href')).toBe('/booths/1')
  })

  it("shows the user's units: °F for temperatures (margin as a difference) and ft/min", async () => {
    useSessionStore().setUnits({ temperature: 'F', airflow: 'ft/min' })
    const w = await mountTile({ booth: booth() })
    expect(w.find('[data-testid="value-air"]').text()).toContain(`70.5${NB}°F`)
    expect(w.find('[data-testid="value-panel"]').text()).toContain(`69.4${NB}°F`)
    // 9 K difference → 16.2 °F difference, not 48.2 °F.
    expect(w.find('[data-testid="value-margin"]').text()).toContain(`+16.2${NB}°F`)
    expect(w.find('[data-testid="value-airflow"]').text()).toContain(`81${NB}ft/min`)
    expect(w.text()).not.toContain('°C')
  })

  it('marks a stale reading in words, with its age, and labels the values as last known', async () => {
    const b = booth({ stale: true, latest: reading({}, 3 * 60_000) })
    const w = await mountTile({ booth: b })
    expect(w.attributes('data-state')).toBe('attention')
    expect(w.find('[data-testid="live-state"]').text()).toBe('Stale')
    expect(w.find('[data-testid="state-detail"]').text()).toContain('3 min ago')
    expect(w.text()).toContain('Last known values')
    // Still in the user's units.
    expect(w.find('[data-testid="value-air"]').text()).toContain(`21.4${NB}°C`)
  })

  it('shows an offline device and a booth without readings', async () => {
    const off = await mountTile({ booth: booth({ deviceStatus: 'offline', stale: true }) })
    expect(off.attributes('data-state')).toBe('offline')
    expect(off.find('[data-testid="live-state"]').text()).toBe('Offline')

    const none = await mountTile({ booth: booth({ latest: null, stale: true, mode: null, deviceStatus: null }) })
    expect(none.find('[data-testid="live-state"]').text()).toBe('No readings')
    expect(none.find('[data-testid="value-air"]').text()).toContain('—')
    expect(none.text()).toContain('Mode unknown')
  })

  it('flags a dew-point margin under 3 °C with a word, not colour alone', async () => {
    const w = await mountTile({ booth: booth({ latest: reading({ dewPointMarginC: 1.4 }) }) })
    expect(w.find('[data-testid="value-margin"]').text()).toContain('Near dew point')
    const ok = await mountTile({ booth: booth() })
    expect(ok.find('[data-testid="value-margin"]').text()).not.toContain('Near dew point')
  })

  it('fills the job and alert areas from props or slots', async () => {
    const bare = await mountTile({ booth: booth() })
    expect(bare.find('[aria-label="Active job"]').exists()).toBe(false)
    expect(bare.find('[aria-label="Open alerts"]').exists()).toBe(false)

    const w = await mountTile({ booth: booth(), job: { title: 'RO 4471 · clearcoat, coat 2', detail: 'Ready in about 6 min', progress: 0.62 }, alertCount: 2 })
    expect(w.find('[aria-label="Active job"]').text()).toContain('RO 4471')
    expect(w.find('[role="progressbar"]').attributes('aria-valuenow')).toBe('62')
    expect(w.find('[aria-label="Open alerts"]').text()).toContain('2 open alerts')

    const s = await mountTile({ booth: booth() }, { job: () => 'Countdown here', alerts: () => 'Alert list here' })
    expect(s.find('[aria-label="Active job"]').text()).toBe('Countdown here')
    expect(s.find('[aria-label="Open alerts"]').text()).toBe('Alert list here')
  })
})
