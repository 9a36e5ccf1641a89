import { useMutation, useQueryClient } from '@tanstack/react-query';
import { courseCreateSchema, type Course, type CourseCreate } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';
import { patientCoursesQueryOptions } from './get-patient-courses';

export const createCourseInputSchema = courseCreateSchema;
export type CreateCourseInput = CourseCreate;

/** POST /api/patients/:id/courses */
export const createCourse = (patientId: string, input: CreateCourseInput) =>
  apiSend<Course>(`/api/patients/${patientId}/courses`, 'POST', input);

export const useCreateCourse = (patientId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateCourseInput) => createCourse(patientId, input),
    onSuccess: () =>
      queryClient.invalidateQueries({ queryKey: patientCoursesQueryOptions().queryKey }),
  });
};
