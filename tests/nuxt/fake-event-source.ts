// A stand-in for the browser's EventSource, driven by the test.
export class FakeEventSource {
  static instances: FakeEventSource[] = []
  static readonly CONNECTING = 0
  static readonly OPEN = 1
  static readonly CLOSED = 2
  readonly url: string
  readyState = 0
  onopen: ((ev: Event) => void) | null = null
  onerror: ((ev: Event) => void) | null = null
  private listeners = new Map<string, ((ev: MessageEvent) => void)[]>()

  constructor(url: string | URL) {
    this.url = String(url)
    FakeEventSource.instances.push(this)
  }

  addEventListener(name: string, fn: (ev: MessageEvent) => void) {
    this.listeners.set(name, [...(this.listeners.get(name) ?? []), fn])
  }

  close() {
    this.readyState = 2
  }

  // test controls
  open() {
    this.readyState = 1
    this.onopen?.(new Event('open'))
  }

  fail() {
    this.onerror?.(new Event('error'))
  }

  emit(name: string, data: unknown) {
    const ev = new MessageEvent(name, { data: typeof data === 'string' ? data : JSON.stringify(data) })
    for (const fn of this.listeners.get(name) ?? []) fn(ev)
  }

  static last(): FakeEventSource {
    const i = FakeEventSource.instances[FakeEventSource.instances.length - 1]
    if (!i) throw new Error('no EventSource was opened')
    return i
  }

  static reset() {
    FakeEventSource.instances = []
  }
}
