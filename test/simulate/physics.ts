// Physical constants and textbook device equations the simulator runs are checked against.

/** Boltzmann constant, J/K (CODATA 2018; exact since the 2019 SI). */
export const BOLTZMANN_J_PER_K = 1.380649e-23;
/** Elementary charge, C (CODATA 2018; exact since the 2019 SI). */
export const ELEMENTARY_CHARGE_C = 1.602176634e-19;
export const ZERO_CELSIUS_K = 273.15;

export function thermalVoltageVolts(celsius: number): number {
  return (BOLTZMANN_J_PER_K * (celsius + ZERO_CELSIUS_K)) / ELEMENTARY_CHARGE_C;
}

/**
 * Saturation current at temperature T for the SPICE diode (read: ngspice source,
 * src/spicelib/devices/dio/diotemp.c, the classic SPICE2 expression):
 * IS(T) = IS · exp((T/Tnom − 1) · EG / (N · V_T(T))) · (T/Tnom)^(XTI/N).
 */
export function diodeSaturationCurrentAmps(
  isAmps: number,
  celsius: number,
  opts: { n?: number; egVolts?: number; xti?: number; tnomCelsius?: number } = {},
): number {
  const n = opts.n ?? 1;
  const eg = opts.egVolts ?? 1.11;
  const xti = opts.xti ?? 3;
  const t = celsius + ZERO_CELSIUS_K;
  const tnom = (opts.tnomCelsius ?? 27) + ZERO_CELSIUS_K;
  return isAmps * Math.exp(((t / tnom - 1) * eg) / (n * thermalVoltageVolts(celsius))) * (t / tnom) ** (xti / n);
}

/** Shockley diode equation solved for the voltage: V = N · V_T · ln(I/IS + 1). */
export function diodeVoltageVolts(currentAmps: number, isAmps: number, celsius: number, n = 1): number {
  return n * thermalVoltageVolts(celsius) * Math.log(currentAmps / isAmps + 1);
}
