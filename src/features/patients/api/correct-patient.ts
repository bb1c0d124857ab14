import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { patientSchema, type UpdatePatientInput } from '@/schemas/case';
import { patientQueries } from './patient-queries';

/** PATCH /api/patients/:id. Cases show the patient's name, so every cached list and case is refetched. */
export function useCorrectPatient(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdatePatientInput) => api.patch(`/api/patients/${id}`, input, patientSchema),
    onSuccess: async (patient) => {
      qc.setQueryData(patientQueries.detail(patient.id).queryKey, patient);
      await qc.invalidateQueries();
    },
  });
}
