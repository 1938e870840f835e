// Copper conductor resistance, two ways: NEC (NFPA 70) Chapter 9 Table 8, and the AWG geometry with
// copper's resistivity. The two agree to about ±0.01 Ω per 1,000 ft for solid wire; tests hold them to it.

export type Awg = 18 | 16 | 14 | 12
export const AWG_SIZES: Awg[] = [18, 16, 14, 12]

/** NEC Chapter 9 Table 8, uncoated copper, ohms per 1,000 ft at 75 °C. */
export const NEC_TABLE_8: Record<Awg, { cmil: number; solid: number; stranded: number }> = {
  18: { cmil: 1620, solid: 7.77, stranded: 7.95 },
  16: { cmil: 2580, solid: 4.89, stranded: 4.99 },
  14: { cmil: 4110, solid: 3.07, stranded: 3.14 },
  12: { cmil: 6530, solid: 1.93, stranded: 1.98 },
}

/** Annealed copper at 20 °C, 0.017241 Ω·mm²/m (NBS Handbook 100) = 10.371 Ω·cmil/ft. */
export const COPPER_OHM_CMIL_PER_FT_20C = 10.371
/** Copper's temperature coefficient referred to 75 °C: R₂ = R₁ [1 + 0.00323 (T₂ − 75 °C)] (NEC Chapter 9 Table 8 note). */
export const COPPER_ALPHA_75 = 0.00323

/** AWG diameter in inches: d = 0.005 × 92^((36 − n) / 39). */
export function awgDiameterIn(awg: number): number {
  return 0.005 * 92 ** ((36 - awg) / 39)
}

/** Cross-section in circular mils: (1000 · d)². */
export function awgAreaCmil(awg: number): number {
  return (1000 * awgDiameterIn(awg)) ** 2
}

/** Solid copper, ohms per 1,000 ft at a temperature, from geometry and resistivity. */
export function formulaOhmsPerKft(awg: number, tempC = 75): number {
  const r20 = (COPPER_OHM_CMIL_PER_FT_20C / awgAreaCmil(awg)) * 1000
  // Table 8's coefficient is referred to 75 °C: first take 20 °C to 75 °C, then to the asked temperature.
  const r75 = r20 / (1 + COPPER_ALPHA_75 * (20 - 75))
  return r75 * (1 + COPPER_ALPHA_75 * (tempC - 75))
}

export function ohmsPerKft(awg: Awg, stranded: boolean): number {
  const row = NEC_TABLE_8[awg]
  return stranded ? row.stranded : row.solid
}

/** Both conductors of a two-wire run: 2 × one-way length × Ω/ft. */
export function loopOhms(awg: Awg, stranded: boolean, oneWayFeet: number): number {
  return (2 * oneWayFeet * ohmsPerKft(awg, stranded)) / 1000
}
