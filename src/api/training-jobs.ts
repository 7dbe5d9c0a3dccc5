import { z } from 'zod';
import { trainingJobSchema, type CreateTrainingJobRequest, type TrainingJob } from '@shared/api/training-jobs';
import { http } from './http';

export function listTrainingJobs(studyId: number): Promise<TrainingJob[]> {
  return http.get('/training-jobs', { query: { studyId }, schema: z.array(trainingJobSchema) });
}

export function getTrainingJob(jobId: number): Promise<TrainingJob> {
  return http.get(`/training-jobs/${jobId}`, { schema: trainingJobSchema });
}

export function createTrainingJob(studyId: number, body: CreateTrainingJobRequest): Promise<TrainingJob> {
  return http.post(`/studies/${studyId}/training-jobs`, body, { schema: trainingJobSchema });
}
