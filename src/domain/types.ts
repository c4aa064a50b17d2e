/**
 * Plain input records for the growth engine. These mirror what the database stores but
 * carry no behaviour and no ORM types, so the server and the client can both build them.
 *
 * Calendar dates are local calendar dates as 'YYYY-MM-DD' strings (no time of day, no zone).
 * Lengths are millimetres.
 */

/** A calendar date, 'YYYY-MM-DD'. */
export type IsoDate = string;

/** State of the sheath at the top of the pseudobulb, as the grower sees it. */
export type SheathState = 'none' | 'forming' | 'empty' | 'budded' | 'dry';

/** Lead status set by the grower. */
export type LeadStatus = 'growing' | 'mature' | 'dried_off' | 'rotted' | 'removed';

/** One dated look at a lead. */
export interface Measurement {
  id: string;
  leadId: string;
  date: IsoDate;
  /** Pseudobulb height in mm (from the rhizome to the top of the bulb or growth). */
  heightMm: number;
  leafCount: number | null;
  sheath: SheathState;
  /** New root tips counted on this lead. */
  rootTips: number | null;
  bulbWidthMm: number | null;
}

/** A new growth of a sympodial plant; one growth year ("season") each. */
export interface Lead {
  id: string;
  plantId: string;
  /** Growth year as an integer, e.g. 2026. */
  season: number;
  label: string;
  firstSeen: IsoDate;
  status: LeadStatus;
  parentLeadId: string | null;
  /** True when the lead broke from a back bulb (an older, leafless pseudobulb). */
  fromBackBulb?: boolean;
}

/** Flowering of one lead. Any date may be missing. */
export interface BloomRecord {
  leadId: string;
  budsSeen: IsoDate | null;
  firstOpen: IsoDate | null;
  lastFaded: IsoDate | null;
  flowerCount: number | null;
  spikeCount: number | null;
}

/** A plant in a collection. */
export interface Plant {
  id: string;
  /** Standard genus abbreviation, e.g. 'C.', 'Rlc.', 'Den.', 'Stan.', 'B.', 'L.'. */
  genus: string;
  parentPlantId: string | null;
  /** Date the plant was divided from its parent (or last divided), if known. */
  dividedOn: IsoDate | null;
  medium: string | null;
  areaId: string | null;
  /** Plant-specific minimum night temperature in °C, overriding the genus default. */
  minNightTempC: number | null;
}

/** One day's minimum and maximum temperature for an area, °C. */
export interface TemperatureReading {
  areaId: string;
  date: IsoDate;
  minC: number;
  maxC: number;
}
