// Booth simulator command line: `npm run simulate -- --booths 3 --speed 30 --seed 7 [--faults [F]] …`.
// See simulator/README.md. Exit codes: 0 on a clean stop (signal or --count reached), 2 on bad arguments,
// 1 when the simulator could not finish (e.g. acknowledgements still missing at the end of a --count run).

import { pathToFileURL } from 'node:url'
import { DEMO_SITE } from './booths'
import { DEFAULT_MQTT_URL, startSimulator, type LogLevel, type SimulatorOptions } from './publisher'
import { SLUG_PATTERN } from './wire'

export const DEFAULT_FAULT_FRACTION = 0.02

export const USAGE = `Usage: npm run simulate -- [options]

  --booths N           number of booths (default 3): downdraft-1, downdraft-2, prep-deck, then sim-booth-<i>
  --speed X            time compression of the booth cycle and drift (default 1; timestamps stay wall-clock)
  --seed S             seed for a repeatable run (number or text; default: from the start time)
  --faults [F]         send broken messages: fraction 0…1 or percent ("2%", or a number above 1); default 2 %
  --url U              broker URL (default: MQTT_URL, else ${DEFAULT_MQTT_URL})
  --rate HZ            readings per second per booth (default 1)
  --count N            stop after N messages per booth
  --site SLUG          site slug (default ${DEMO_SITE})
  --password P         device password (default: DEMO_DEVICE_PASSWORD)
  --humidity-drift P   intake RH trend, percentage points per simulated hour (default 0)
  --drift-peak P       the drift comes and goes: up to P points, an hour there, back, two hours' rest (repeats)
  --no-dropouts        no missing channels or message gaps
  --summary SEC        seconds between summary lines (default 10; 0 = off)
  --quiet              only errors and the final line
  -h, --help           this text
`

export class UsageError extends Error {}

export interface CliOptions {
  help: boolean
  quiet: boolean
  summarySeconds: number
  sim: SimulatorOptions
}

function parseNumber(flag: string, raw: string | undefined, check: (n: number) => boolean, what: string): number {
  if (raw === undefined || raw.startsWith('--')) throw new UsageError(`${flag} needs a value (${what})`)
  const n = Number(raw)
  if (raw.trim() === '' || !Number.isFinite(n) || !check(n)) throw new UsageError(`${flag}: expected ${what}, got "${raw}"`)
  return n
}

/** "0.02" → 0.02, "2%" → 0.02, "5" → 0.05 (numbers above 1 are percent). */
export function parseFaultFraction(raw: string): number {
  const text = raw.trim()
  const percent = text.endsWith('%')
  const n = Number(percent ? text.slice(0, -1) : text)
  if (text === '' || text === '%' || !Number.isFinite(n) || n < 0) throw new UsageError(`--faults: expected a fraction or percent, got "${raw}"`)
  const fraction = percent || n > 1 ? n / 100 : n
  if (fraction > 1) throw new UsageError(`--faults: at most 100 %, got "${raw}"`)
  return fraction
}

export function parseCliArgs(argv: readonly string[], env: NodeJS.ProcessEnv = process.env): CliOptions {
  const sim: SimulatorOptions = {}
  let help = false
  let quiet = false
  let summarySeconds = 10
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i] ?? ''
    const [flag, inline] = arg.startsWith('--') && arg.includes('=') ? [arg.slice(0, arg.indexOf('=')), arg.slice(arg.indexOf('=') + 1)] : [arg, undefined]
    const value = (): string | undefined => (inline !== undefined ? inline : argv[++i])
    switch (flag) {
      case '-h':
      case '--help':
        help = true
        break
      case '--booths':
        sim.booths = parseNumber(flag, value(), (n) => Number.isInteger(n) && n >= 1 && n <= 10_000, 'an integer 1…10000')
        break
      case '--speed':
        sim.speed = parseNumber(flag, value(), (n) => n > 0 && n <= 100_000, 'a number above 0')
        break
      case '--seed': {
        const raw = value()
        if (raw === undefined || raw === '') throw new UsageError('--seed needs a value')
        sim.seed = /^-?\d+$/.test(raw) && Number.isSafeInteger(Number(raw)) ? Number(raw) : raw
        break
      }
      case '--faults': {
        if (inline !== undefined) {
          sim.faults = parseFaultFraction(inline)
        } else {
          const next = argv[i + 1]
          if (next !== undefined && !next.startsWith('-')) {
            sim.faults = parseFaultFraction(next)
            i++
          } else {
            sim.faults = DEFAULT_FAULT_FRACTION
          }
        }
        break
      }
      case '--url': {
        const raw = value()
        if (raw === undefined || !/^(mqtts?|wss?|tcp|tls):\/\//.test(raw)) throw new UsageError(`--url: expected mqtt://host:port (or mqtts, ws, wss), got "${raw ?? ''}"`)
        sim.url = raw
        break
      }
      case '--rate':
        sim.rateHz = parseNumber(flag, value(), (n) => n > 0 && n <= 1000, 'a rate in Hz within (0, 1000]')
        break
      case '--count':
        sim.count = parseNumber(flag, value(), (n) => Number.isInteger(n) && n >= 1, 'a positive integer')
        break
      case '--site': {
        const raw = value()
        if (raw === undefined || !SLUG_PATTERN.test(raw)) throw new UsageError(`--site: expected a slug like "${DEMO_SITE}", got "${raw ?? ''}"`)
        sim.site = raw
        break
      }
      case '--password': {
        const raw = value()
        if (raw === undefined) throw new UsageError('--password needs a value')
        sim.password = raw
        break
      }
      case '--humidity-drift':
        sim.humidityDriftPct = parseNumber(flag, value(), (n) => Math.abs(n) <= 1000, 'percentage points per simulated hour')
        break
      case '--drift-peak': {
        const peakPct = parseNumber(flag, value(), (n) => n > 0 && n <= 100, 'percentage points within (0, 100]')
        sim.model = { ...sim.model, humidityDriftEpisodes: { peakPct, holdHours: 1, restHours: 2 } }
        break
      }
      case '--no-dropouts':
        sim.dropouts = false
        break
      case '--summary':
        summarySeconds = parseNumber(flag, value(), (n) => n >= 0, 'seconds (0 = off)')
        break
      case '--quiet':
        quiet = true
        break
      default:
        throw new UsageError(`unknown argument "${arg}"`)
    }
  }
  if (sim.password === undefined && env.DEMO_DEVICE_PASSWORD) sim.password = env.DEMO_DEVICE_PASSWORD
  if (sim.url === undefined && env.MQTT_URL) sim.url = env.MQTT_URL
  return { help, quiet, summarySeconds, sim }
}

export async function main(argv: readonly string[]): Promise<number> {
  let cli: CliOptions
  try {
    cli = parseCliArgs(argv)
  } catch (error) {
    if (error instanceof UsageError) {
      process.stderr.write(`simulate: ${error.message}\n\n${USAGE}`)
      return 2
    }
    throw error
  }
  if (cli.help) {
    process.stdout.write(USAGE)
    return 0
  }
  const out = (line: string): void => {
    process.stdout.write(`${line}\n`)
  }
  const log = (line: string, level: LogLevel): void => {
    if (level === 'warn') process.stderr.write(`${line}\n`)
    else if (level === 'result' || !cli.quiet) out(line)
  }
  const sim = startSimulator({
    ...cli.sim,
    log,
    summaryIntervalMs: cli.quiet ? 0 : cli.summarySeconds * 1000,
  })

  return await new Promise<number>((resolve) => {
    let firstSignalMs: number | undefined
    const finish = (code: number): void => {
      process.off('SIGINT', onSignal)
      process.off('SIGTERM', onSignal)
      resolve(code)
    }
    const onSignal = (signal: NodeJS.Signals): void => {
      if (firstSignalMs !== undefined) {
        // The same Ctrl-C often arrives twice (terminal process group + a wrapper relaying it): ignore
        // repeats within a second; a later one skips the cleanup.
        if (Date.now() - firstSignalMs < 1000) return
        process.stderr.write(`simulate: second ${signal}, exiting without cleanup\n`)
        finish(130)
        return
      }
      firstSignalMs = Date.now()
      out(`[sim] ${signal}: publishing offline status and disconnecting…`)
      void sim.stop().then(() => finish(0))
    }
    process.on('SIGINT', onSignal)
    process.on('SIGTERM', onSignal)
    if (cli.sim.count !== undefined) {
      void sim.done.then(async () => {
        await sim.stop()
        const t = sim.stats().totals
        finish(t.pending === 0 && t.failed === 0 ? 0 : 1)
      })
    }
  })
}

const invokedDirectly = process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href
if (invokedDirectly) {
  main(process.argv.slice(2)).then(
    (code) => process.exit(code),
    (error: unknown) => {
      process.stderr.write(`simulate: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`)
      process.exit(1)
    },
  )
}
