// Nitro's raw plugin: `import data from 'raw:./file'` inlines a file (a binary one as a Uint8Array).
declare module 'raw:*' {
  const data: unknown
  export default data
}
