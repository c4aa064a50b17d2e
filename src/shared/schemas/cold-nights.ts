import { z } from 'zod';
import { calendarDateSchema, idSchema } from './common';

/** How many nights the cold-night check looks at: tonight and the next three. */
export const COLD_NIGHTS_AHEAD = 4;

export const bringInPlantSchema = z.object({
  plantId: idSchema,
  tag: z.string(),
  /** As written on a label: "C. Quillon Dawn 'Oriel'". */
  name: z.string(),
  areaId: idSchema,
  areaName: z.string(),
  /** The plant's minimum night temperature, °C. */
  limitC: z.number(),
  /** `plant`: the grower's own limit for this plant; `genus`: the genus default. */
  limitSource: z.enum(['plant', 'genus']),
  /** The forecast minimum for the night, °C. */
  lowC: z.number(),
  /** How far the forecast goes under the limit, °C (> 0). */
  marginC: z.number(),
});

export const coldNightSchema = z.object({
  /** The calendar date (at the collection's location) on whose evening the night starts. */
  date: calendarDateSchema,
  /** Forecast minimum temperature of the night, °C. */
  lowC: z.number(),
  plants: z.array(bringInPlantSchema),
});

export const coldNightsSchema = z.discriminatedUnion('status', [
  z.object({
    status: z.literal('ok'),
    latitude: z.number(),
    longitude: z.number(),
    /** Tonight first. */
    nights: z.array(coldNightSchema),
    /** Plants with no area: where they stand is unknown, so they are not checked. */
    unplacedPlants: z.number().int(),
    fetchedAt: z.iso.datetime(),
  }),
  z.object({ status: z.literal('unavailable'), reason: z.string() }),
  z.object({ status: z.literal('no_location') }),
]);

export type BringInPlant = z.infer<typeof bringInPlantSchema>;
export type ColdNight = z.infer<typeof coldNightSchema>;
export type ColdNights = z.infer<typeof coldNightsSchema>;
