import { z } from 'zod'
import { AWG_SIZES } from './conductors'

const reading = z.union([z.number().nonnegative().finite(), z.literal('open')])

/** The body of POST /api/diagnose: a loop arrangement and any subset of readings. */
export const diagnoseRequest = z.object({
  arrangement: z.object({
    // Initiating-circuit EOL resistors run from about 1 kΩ to tens of kΩ (common practice); a value
    // outside 470 Ω–100 kΩ is more likely a slip of units than a panel's resistor.
    eolOhms: z
      .number()
      .min(470, { message: 'An end-of-line resistor below 470 Ω is outside the range used on initiating circuits; check the value and its units (Ω, not kΩ).' })
      .max(100_000, { message: 'An end-of-line resistor above 100 kΩ is outside the range used on initiating circuits; check the value and its units (Ω, not kΩ).' }),
    eolPlacement: z.enum(['through-supervisory', 'across-pair']),
    alarmTerminal: z.enum(['NO', 'NC']),
    supervisoryTerminal: z.enum(['NO', 'NC']),
    supervisoryLabelledIn: z.enum(['de-energized', 'normal']).default('de-energized'),
    conductor: z.object({
      awg: z.union(AWG_SIZES.map((n) => z.literal(n)) as [z.ZodLiteral<18>, z.ZodLiteral<16>, z.ZodLiteral<14>, z.ZodLiteral<12>]),
      stranded: z.boolean(),
      oneWayFeet: z.number().nonnegative().max(20_000),
    }),
    measuredAt: z.enum(['panel', 'device']),
    /** The resistor's tolerance as a fraction (0.05 = 5 %); the engine assumes 5 % without it. */
    tolerance: z.number().positive().max(0.5).optional(),
    /** The panel input's alarm threshold, the most wire a closed contact may carry (default 100 Ω: common practice). */
    maxLineOhms: z.number().positive().max(10_000).optional(),
    /** The same two as a detector records them: tolerance in percent, threshold in ohms. */
    eolTolerancePct: z.number().positive().max(50).optional(),
    alarmThresholdOhms: z.number().positive().max(10_000).optional(),
  })
    .refine((a) => a.tolerance === undefined || a.eolTolerancePct === undefined, { message: 'Give the tolerance once: tolerance (a fraction) or eolTolerancePct (percent).', path: ['eolTolerancePct'] })
    .refine((a) => a.maxLineOhms === undefined || a.alarmThresholdOhms === undefined, { message: 'Give the threshold once: maxLineOhms or alarmThresholdOhms.', path: ['alarmThresholdOhms'] })
    .transform(({ eolTolerancePct, alarmThresholdOhms, ...a }) => ({
      ...a,
      ...(eolTolerancePct !== undefined ? { tolerance: eolTolerancePct / 100 } : {}),
      ...(alarmThresholdOhms !== undefined ? { maxLineOhms: alarmThresholdOhms } : {}),
    })),
  readings: z
    .object({ normal: reading, alarm: reading, trouble: reading, unpowered: reading })
    .partial()
    .strict()
    .default({}),
})

