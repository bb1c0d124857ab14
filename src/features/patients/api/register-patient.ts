import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { patientSchema, type CreatePatientInput } from '@/schemas/case';
import { patientKeys, patientQueries } from './patient-queries';

export function useRegisterPatient() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreatePatientInput) => api.post('/api/patients', input, patientSchema),
    onSuccess: async (patient) => {
      qc.setQueryData(patientQueries.detail(patient.id).queryKey, patient);
      await qc.invalidateQueries({ queryKey: patientKeys.searches() });
    },
  });
}
