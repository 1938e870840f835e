// Duct air velocity and the sampling-tube pressure difference, checked against a detector's listed
// ranges. A duct detector samples correctly only inside both ranges, which come from each model's
// listing and are stored per model: nothing here assumes a typical figure.

/** Inside dimensions of the duct at the detector, in inches (a lined duct is smaller than its outside size). */
export type Duct = { shape: 'rectangular'; widthIn: number; heightIn: number } | { shape: 'round'; diameterIn: number }

export type RangeStatus = 'in-range' | 'too-low' | 'too-high'

export interface VelocityCheck {
  velocityFpm: number
  status: RangeStatus
  message: string
}

export interface PressureCheck {
  measuredInWc: number
  status: RangeStatus
  message: string
}

/** Square inches in a square foot: area (ft²) = W(in) × H(in) ÷ 144, round π·r(in)² ÷ 144 (common practice). */
export const SQ_IN_PER_SQ_FT = 144
/** Metres in a foot, exact by definition of the international foot (from memory). */
export const METRES_PER_FOOT = 0.3048

function positive(name: string, value: number) {
  if (!(Number.isFinite(value) && value > 0)) throw new RangeError(`${name} must be a positive number, got ${value}`)
}

// A stopped fan is a real reading (0 cfm); a negative or non-numeric one is a typing slip.
function nonNegative(name: string, value: number) {
  if (!(Number.isFinite(value) && value >= 0)) throw new RangeError(`${name} must be zero or more, got ${value}`)
}

/** Cross-section of the duct in square feet. */
export function ductAreaFt2(duct: Duct): number {
  if (duct.shape === 'rectangular') {
    positive('widthIn', duct.widthIn)
    positive('heightIn', duct.heightIn)
    return (duct.widthIn * duct.heightIn) / SQ_IN_PER_SQ_FT
  }
  positive('diameterIn', duct.diameterIn)
  const r = duct.diameterIn / 2
  return (Math.PI * r * r) / SQ_IN_PER_SQ_FT
}

/** Average air velocity in ft/min: cfm ÷ area (ft²) (common practice). */
export function ductVelocityFpm(cfm: number, duct: Duct): number {
  nonNegative('cfm', cfm)
  return cfm / ductAreaFt2(duct)
}

/** The airflow in cfm that gives this velocity in this duct: fpm × area (ft²). */
export function airflowForVelocity(fpm: number, duct: Duct): number {
  nonNegative('fpm', fpm)
  return fpm * ductAreaFt2(duct)
}

export function fpmToMetresPerSecond(fpm: number): number {
  return (fpm * METRES_PER_FOOT) / 60
}

export function metresPerSecondToFpm(mps: number): number {
  return (mps * 60) / METRES_PER_FOOT
}

function checkRange(min: number, max: number) {
  nonNegative('listed minimum', min)
  nonNegative('listed maximum', max)
  if (!(min <= max)) throw new RangeError(`listed minimum ${min} is above listed maximum ${max}`)
}

const fpm = (n: number) => `${Math.round(n).toLocaleString('en-US')} ft/min`

/** Velocity at the detector against the model's listed range (from the device's listing). */
export function checkVelocity(input: {
  cfm: number
  duct: Duct
  listedMinFpm: number
  listedMaxFpm: number
}): VelocityCheck {
  const { listedMinFpm: min, listedMaxFpm: max } = input
  checkRange(min, max)
  const velocityFpm = ductVelocityFpm(input.cfm, input.duct)
  const range = `${fpm(min)} to ${fpm(max)}`
  if (velocityFpm < min) {
    return {
      velocityFpm,
      status: 'too-low',
      message:
        `Air velocity ${fpm(velocityFpm)} is below the listed range (${range}): the detector may not draw enough air ` +
        'through its head. Check that the airflow and duct size on record are right and the fan runs at design speed; ' +
        'if it is still low, the location needs review against the device’s instructions.',
    }
  }
  if (velocityFpm > max) {
    return {
      velocityFpm,
      status: 'too-high',
      message:
        `Air velocity ${fpm(velocityFpm)} is above the listed range (${range}). Check that the airflow and duct size ` +
        'on record are right; if it is still high, the location needs review against the device’s instructions.',
    }
  }
  return {
    velocityFpm,
    status: 'in-range',
    message: `Air velocity ${fpm(velocityFpm)} is within the listed range (${range}).`,
  }
}

const inWc = (n: number) => `${Number(n.toFixed(3))} in. w.c.`

// What to look at when the pressure difference is out of range: common practice.
const TUBE_CHECKS =
  'Check that the inlet tube’s holes face into the airflow, that both tubes span the duct as the instructions ' +
  'show, and that neither tube is blocked, kinked or holding water (common practice).'

/**
 * Pressure difference between the inlet and exhaust tubes against the model's published range,
 * checked at the annual test (NFPA 72-2010 Table 14.4.2.2 item 14(g)(6)).
 */
export function checkPressure(input: {
  measuredInWc: number
  listedMinInWc: number
  listedMaxInWc: number
}): PressureCheck {
  const { measuredInWc, listedMinInWc: min, listedMaxInWc: max } = input
  checkRange(min, max)
  // Below zero is allowed (reversed tubes); NaN or infinity is not a reading.
  if (!Number.isFinite(measuredInWc)) throw new RangeError(`measuredInWc must be a number, got ${measuredInWc}`)
  const range = `${inWc(min)} to ${inWc(max)}`
  if (measuredInWc < min) {
    // A reading below zero means the exhaust side is higher than the inlet: tubes reversed (common practice).
    const reversed = measuredInWc < 0 ? ' A reading below zero usually means the tubes are reversed.' : ''
    return {
      measuredInWc,
      status: 'too-low',
      message: `Pressure difference ${inWc(measuredInWc)} is below the listed range (${range}).${reversed} ${TUBE_CHECKS}`,
    }
  }
  if (measuredInWc > max) {
    return {
      measuredInWc,
      status: 'too-high',
      message:
        `Pressure difference ${inWc(measuredInWc)} is above the listed range (${range}). ${TUBE_CHECKS} ` +
        'Then check the duct velocity against its listed range.',
    }
  }
  return {
    measuredInWc,
    status: 'in-range',
    message: `Pressure difference ${inWc(measuredInWc)} is within the listed range (${range}).`,
  }
}
