import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import {
  areaSchema,
  bloomRecordSchema,
  careEntrySchema,
  divideResultSchema,
  leadDetailSchema,
  leadSchema,
  measurementSchema,
  plantDetailSchema,
  plantPageSchema,
  plantSchema,
  roundsSchema,
  type CareInput,
  type MeasurementInput,
  type PlantInput,
} from '@/shared/schemas/records';
import { request } from '../client';
import { fromPageOrServer } from '../page-data';

export interface PlantFilters {
  q?: string;
  genus?: string;
  areaId?: string;
  leadStatus?: string;
  sort?: 'tag' | 'name' | 'updated' | 'acquired';
  page?: number;
  /** At most 100 (the server's limit). */
  pageSize?: number;
}

export const recordKeys = {
  all: (c: string) => ['collections', c, 'records'] as const,
  areas: (c: string) => ['collections', c, 'records', 'areas'] as const,
  plants: (c: string, filters: PlantFilters = {}) => ['collections', c, 'records', 'plants', filters] as const,
  plant: (c: string, id: string) => ['collections', c, 'records', 'plant', id] as const,
  lead: (c: string, id: string) => ['collections', c, 'records', 'lead', id] as const,
  rounds: (c: string) => ['collections', c, 'records', 'rounds'] as const,
};

const base = (collectionId: string) => `/collections/${collectionId}`;

function toQuery(filters: PlantFilters): string {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(filters)) if (value !== undefined && value !== '') params.set(key, String(value));
  const text = params.toString();
  return text ? `?${text}` : '';
}

export function useAreasQuery(collectionId: string) {
  return useQuery({
    queryKey: recordKeys.areas(collectionId),
    queryFn: () => request(`${base(collectionId)}/areas`, { schema: z.array(areaSchema) }),
  });
}

export function usePlantsQuery(collectionId: string, filters: PlantFilters) {
  return useQuery({
    queryKey: recordKeys.plants(collectionId, filters),
    queryFn: () => request(`${base(collectionId)}/plants${toQuery(filters)}`, { schema: plantPageSchema }),
    placeholderData: keepPreviousData,
  });
}

export function usePlantQuery(collectionId: string, plantId: string) {
  return useQuery({
    queryKey: recordKeys.plant(collectionId, plantId),
    queryFn: () => request(`${base(collectionId)}/plants/${plantId}`, { schema: plantDetailSchema }),
  });
}

export function useLeadQuery(collectionId: string, leadId: string | null | undefined) {
  return useQuery({
    queryKey: recordKeys.lead(collectionId, leadId ?? 'none'),
    ...fromPageOrServer(`${base(collectionId)}/leads/${leadId}`, leadDetailSchema),
    enabled: !!leadId,
  });
}

export function useRoundsQuery(collectionId: string) {
  return useQuery({
    queryKey: recordKeys.rounds(collectionId),
    queryFn: () => request(`${base(collectionId)}/rounds`, { schema: roundsSchema }),
  });
}

/** Any write to the records can change lists, pages and the walk: refresh them all. */
function useInvalidateRecords(collectionId: string) {
  const client = useQueryClient();
  return () => client.invalidateQueries({ queryKey: recordKeys.all(collectionId) });
}

export function useCreatePlantMutation(collectionId: string) {
  const invalidate = useInvalidateRecords(collectionId);
  return useMutation({
    mutationFn: (input: PlantInput) => request(`${base(collectionId)}/plants`, { method: 'POST', body: input, schema: plantSchema }),
    onSuccess: invalidate,
  });
}

export function useUpdatePlantMutation(collectionId: string, plantId: string) {
  const invalidate = useInvalidateRecords(collectionId);
  return useMutation({
    mutationFn: (input: Partial<PlantInput> & { version: number }) =>
      request(`${base(collectionId)}/plants/${plantId}`, { method: 'PATCH', body: input, schema: plantSchema }),
    onSettled: invalidate,
  });
}

export function useDeletePlantMutation(collectionId: string) {
  const invalidate = useInvalidateRecords(collectionId);
  return useMutation({
    mutationFn: (plantId: string) => request(`${base(collectionId)}/plants/${plantId}`, { method: 'DELETE' }),
    onSuccess: invalidate,
  });
}

export function useDividePlantMutation(collectionId: string, plantId: string) {
  const invalidate = useInvalidateRecords(collectionId);
  return useMutation({
    mutationFn: (input: { dividedOn: string; pieces: Array<{ tag: string; leadIds: string[]; bulbCount?: number | null; medium?: string | null }> }) =>
      request(`${base(collectionId)}/plants/${plantId}/divide`, { method: 'POST', body: input, schema: divideResultSchema }),
    onSuccess: invalidate,
  });
}

export function useCreateLeadMutation(collectionId: string, plantId: string) {
  const invalidate = useInvalidateRecords(collectionId);
  return useMutation({
    mutationFn: (input: { season: number; label: string; firstSeen: string; fromBackBulb?: boolean }) =>
      request(`${base(collectionId)}/plants/${plantId}/leads`, { method: 'POST', body: input, schema: leadSchema }),
    onSuccess: invalidate,
  });
}

export function useUpdateLeadMutation(collectionId: string, leadId: string) {
  const invalidate = useInvalidateRecords(collectionId);
  return useMutation({
    mutationFn: (input: { status?: string; version: number }) =>
      request(`${base(collectionId)}/leads/${leadId}`, { method: 'PATCH', body: input, schema: leadSchema }),
    onSettled: invalidate,
  });
}

/** Posts one measurement; the client key makes a retry (or a replay from the outbox) harmless. */
export function postMeasurement(collectionId: string, leadId: string, input: MeasurementInput) {
  return request(`${base(collectionId)}/leads/${leadId}/measurements`, { method: 'POST', body: input, schema: measurementSchema });
}

export function useAddMeasurementMutation(collectionId: string, leadId: string) {
  const invalidate = useInvalidateRecords(collectionId);
  return useMutation({
    mutationFn: (input: MeasurementInput) => postMeasurement(collectionId, leadId, input),
    onSuccess: invalidate,
  });
}

export function useDeleteMeasurementMutation(collectionId: string) {
  const invalidate = useInvalidateRecords(collectionId);
  return useMutation({
    mutationFn: (measurementId: string) => request(`${base(collectionId)}/measurements/${measurementId}`, { method: 'DELETE' }),
    onSuccess: invalidate,
  });
}

export function useMarkSheathMutation(collectionId: string, leadId: string) {
  const invalidate = useInvalidateRecords(collectionId);
  return useMutation({
    mutationFn: (input: { date: string; sheath: string; clientKey: string }) =>
      request(`${base(collectionId)}/leads/${leadId}/sheath`, { method: 'POST', body: input, schema: measurementSchema }),
    onSuccess: invalidate,
  });
}

export function useSaveBloomMutation(collectionId: string, leadId: string) {
  const invalidate = useInvalidateRecords(collectionId);
  return useMutation({
    mutationFn: (input: Record<string, unknown>) =>
      request(`${base(collectionId)}/leads/${leadId}/bloom`, { method: 'PUT', body: input, schema: bloomRecordSchema }),
    onSettled: invalidate,
  });
}

export function useAddCareMutation(collectionId: string, plantId: string) {
  const invalidate = useInvalidateRecords(collectionId);
  return useMutation({
    mutationFn: (input: CareInput) =>
      request(`${base(collectionId)}/plants/${plantId}/care`, { method: 'POST', body: input, schema: careEntrySchema }),
    onSuccess: invalidate,
  });
}

export function useSaveRoundOrderMutation(collectionId: string) {
  const invalidate = useInvalidateRecords(collectionId);
  return useMutation({
    mutationFn: (plantIds: string[]) => request(`${base(collectionId)}/rounds/order`, { method: 'PUT', body: { plantIds } }),
    onSuccess: invalidate,
  });
}
