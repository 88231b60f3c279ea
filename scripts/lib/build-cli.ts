import { ensureBuilt } from './build'

// Runs under the build lock (see ensureBuilt).
ensureBuilt(process.argv.includes('--force'))
