import { keepPreviousData, useQuery } from '@tanstack/react-query';
import {
  attentionListSchema,
  backtestSchema,
  bloomCalendarSchema,
  comparisonSchema,
  leadForecastSchema,
  leadStoriesSchema,
  plantTrendSchema,
  type LeadStoryResponse,
} from '@/shared/schemas/engine';
import { request } from '../client';
import { fromPageOrServer } from '../page-data';
import { recordKeys } from './records';

/** Forecasts live under the records key, so any record write refreshes them too. */
export const engineKeys = {
  forecast: (c: string, leadId: string) => [...recordKeys.all(c), 'forecast', leadId] as const,
  trend: (c: string, plantId: string) => [...recordKeys.all(c), 'trend', plantId] as const,
  attention: (c: string, date?: string) => [...recordKeys.all(c), 'attention', date ?? 'today'] as const,
  calendar: (c: string, params: CalendarParams) => [...recordKeys.all(c), 'calendar', params] as const,
  backtest: (c: string) => [...recordKeys.all(c), 'backtest'] as const,
  stories: (c: string) => [...recordKeys.all(c), 'stories'] as const,
  compare: (c: string, params: CompareParams) => [...recordKeys.all(c), 'compare', params] as const,
};

export interface CalendarParams {
  from?: string;
  to?: string;
  on?: string;
}

export interface CompareParams {
  by: 'family' | 'medium' | 'area';
  plantId?: string;
}

const base = (collectionId: string) => `/collections/${collectionId}`;

function query(params: object): string {
  const search = new URLSearchParams();
  for (const [key, value] of Object.entries(params)) if (value) search.set(key, String(value));
  const text = search.toString();
  return text ? `?${text}` : '';
}

export function useLeadForecastQuery(collectionId: string, leadId: string) {
  return useQuery({
    queryKey: engineKeys.forecast(collectionId, leadId),
    ...fromPageOrServer(`${base(collectionId)}/leads/${leadId}/forecast`, leadForecastSchema),
  });
}

export function usePlantTrendQuery(collectionId: string, plantId: string) {
  return useQuery({
    queryKey: engineKeys.trend(collectionId, plantId),
    queryFn: () => request(`${base(collectionId)}/plants/${plantId}/trend`, { schema: plantTrendSchema }),
  });
}

export function useAttentionQuery(collectionId: string, date?: string) {
  return useQuery({
    queryKey: engineKeys.attention(collectionId, date),
    ...fromPageOrServer(`${base(collectionId)}/attention${query({ date })}`, attentionListSchema),
    enabled: !!collectionId,
  });
}

export function useCalendarQuery(collectionId: string, params: CalendarParams) {
  return useQuery({
    queryKey: engineKeys.calendar(collectionId, params),
    queryFn: () => request(`${base(collectionId)}/calendar${query(params)}`, { schema: bloomCalendarSchema }),
    placeholderData: keepPreviousData,
    enabled: !!collectionId,
  });
}

export function useBacktestQuery(collectionId: string) {
  return useQuery({
    queryKey: engineKeys.backtest(collectionId),
    queryFn: () => request(`${base(collectionId)}/backtest`, { schema: backtestSchema }),
    enabled: !!collectionId,
  });
}

export function useCompareQuery(collectionId: string, params: CompareParams | null) {
  return useQuery({
    queryKey: engineKeys.compare(collectionId, params ?? { by: 'medium' }),
    queryFn: () => request(`${base(collectionId)}/compare${query(params ?? {})}`, { schema: comparisonSchema }),
    enabled: !!collectionId && !!params,
    placeholderData: keepPreviousData,
  });
}

/** Every current lead's story, by lead id: what Plants, a plant page and Rounds show beside each lead. */
export function useLeadStoriesQuery(collectionId: string) {
  return useQuery({
    queryKey: engineKeys.stories(collectionId),
    queryFn: () => request(`${base(collectionId)}/lead-stories`, { schema: leadStoriesSchema }),
    select: (data): Map<string, LeadStoryResponse> => new Map(data.stories.map((s) => [s.leadId, s.story])),
    enabled: !!collectionId,
  });
}
