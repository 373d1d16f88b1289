// psychrolib ships no types; only the calls the tests use are declared.
declare module "psychrolib" {
  interface Psychrometrics {
    readonly SI: number;
    readonly IP: number;
    SetUnitSystem(unitSystem: number): void;
    GetSatVapPres(tDryBulb: number): number;
    GetTDewPointFromRelHum(tDryBulb: number, relHum: number): number;
    GetTDewPointFromVapPres(tDryBulb: number, vapPres: number): number;
    GetVapPresFromRelHum(tDryBulb: number, relHum: number): number;
  }
  const psychrolib: Psychrometrics;
  export default psychrolib;
}
