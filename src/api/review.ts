import { gapReviewSchema, reviewMailResultSchema, type GapReview, type ReviewMailResult } from '@shared/api/review';
import { http } from './http';

/** The gap review of a stopped session (409 session-not-stopped before). */
export function getReview(sessionId: number): Promise<GapReview> {
  return http.get(`/sessions/${sessionId}/review`, { schema: gapReviewSchema });
}

/** The review as a PDF (download link). */
export function reviewPdfUrl(sessionId: number): string {
  return `/api/sessions/${sessionId}/review.pdf`;
}

/** Sends the review (PDF attached) to the study's investigator. */
export function mailReview(sessionId: number): Promise<ReviewMailResult> {
  return http.post(`/sessions/${sessionId}/review/mail`, undefined, { schema: reviewMailResultSchema });
}
