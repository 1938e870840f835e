import { z } from 'zod'
import { AWG_SIZES } from './conductors'

const reading = z.union([z.number().nonnegative().finite(), z.literal('open')])

/** The body of POST /api/diagnose: a loop arrangement and any subset of readings. */
export const diagnoseRequest = z.object({
  arrangement: z.object({
    eolOhms: z.number().positive().max(1_000_000),
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
    tolerance: z.number().positive().max(0.5).optional(),
    maxLineOhms: z.number().positive().max(10_000).optional(),
  }),
  readings: z
    .object({ normal: reading, alarm: reading, trouble: reading, unpowered: reading })
    .partial()
    .strict()
    .default({}),
})

