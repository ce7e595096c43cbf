import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export interface OpenApiOperation {
  summary: string;
  description?: string;
  'x-access'?: string;
  parameters?: { name: string; in: string }[];
  requestBody?: { content: Record<string, { schema?: { $ref?: string } }> };
}
export interface JsonSchema {
  type?: string | string[]; description?: string; enum?: unknown[]; const?: unknown; $ref?: string;
  properties?: Record<string, JsonSchema>; required?: string[]; items?: JsonSchema;
  minimum?: number; maximum?: number; maxLength?: number; maxItems?: number; pattern?: string; format?: string;
  anyOf?: JsonSchema[]; oneOf?: JsonSchema[];
  $defs?: Record<string, JsonSchema>;
}
export interface OpenApiDocument {
  openapi: string;
  info: { title: string; version: string; description?: string };
  servers?: { url: string }[];
  paths: Record<string, Record<string, OpenApiOperation>>;
  components: { schemas: Record<string, JsonSchema>; securitySchemes: Record<string, { description?: string; name?: string; in?: string }> };
}

export const getOpenApi = (signal?: AbortSignal) => api.get<OpenApiDocument>('/openapi.json', { signal });
export const getOpenApiQueryOptions = () => queryOptions({ queryKey: ['openapi'], queryFn: ({ signal }) => getOpenApi(signal), staleTime: 10 * 60_000 });
export const useOpenApi = () => useQuery(getOpenApiQueryOptions());
