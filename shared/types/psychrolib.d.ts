// Ambient types for the few psychrolib (CommonJS, untyped) functions we use: the tests check our psychrometrics
// against it. Call SetUnitSystem(SI) first; relative humidity is a fraction 0…1.
declare module 'psychrolib' {
  interface PsychroLib {
    readonly IP: 1
    readonly SI: 2
    SetUnitSystem(unitSystem: 1 | 2): void
    /** Saturation vapour pressure, Pa (SI), over water above the triple point and over ice below. */
    GetSatVapPres(tDryBulbC: number): number
    /** Dew point, °C (SI), from dry bulb °C and RH as a fraction 0…1. */
    GetTDewPointFromRelHum(tDryBulbC: number, relHum: number): number
    /** Partial pressure of water vapour, Pa (SI), from dry bulb °C and RH fraction. */
    GetVapPresFromRelHum(tDryBulbC: number, relHum: number): number
  }
  const psychrolib: PsychroLib
  export default psychrolib
}
