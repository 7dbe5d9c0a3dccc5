import { z } from 'zod';
import {
  decoderDetailSchema, decoderSummarySchema, type DecoderDetail, type DecoderSummary, type ImportDecoderRequest,
} from '@shared/api/decoders';
import { http } from './http';

export function listDecoders(studyId?: number): Promise<DecoderSummary[]> {
  return http.get('/decoders', { query: { studyId }, schema: z.array(decoderSummarySchema) });
}

export function getDecoder(decoderId: number): Promise<DecoderDetail> {
  return http.get(`/decoders/${decoderId}`, { schema: decoderDetailSchema });
}

/**
 * Import an artifact written by `aftercue train` (and optionally its REPORT.json); the server
 * verifies its SHA-256 seal and its fit to the study.
 */
export function importDecoder(studyId: number, body: ImportDecoderRequest): Promise<DecoderSummary> {
  return http.post(`/studies/${studyId}/decoders`, body, { schema: decoderSummarySchema });
}

/** Seal the decoder: its artifact never changes after this. */
export function freezeDecoder(decoderId: number): Promise<DecoderSummary> {
  return http.post(`/decoders/${decoderId}/freeze`, undefined, { schema: decoderSummarySchema });
}

/** Where the browser downloads the artifact JSON (a plain link; the session cookie authorises it). */
export function decoderArtifactUrl(decoderId: number): string {
  return `/api/decoders/${decoderId}/artifact`;
}
