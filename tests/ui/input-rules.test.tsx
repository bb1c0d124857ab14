import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { fireEvent, render, screen } from '@testing-library/react';
import type { ReactNode } from 'react';
import { createMemoryRouter, RouterProvider } from 'react-router-dom';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { RateCheck } from '@/features/calculations/components/rate-check';
import { LabProfileForm } from '@/features/lab-profile/components/lab-profile-form';
import { NewPatientForm } from '@/features/patients/components/new-patient-form';
import { VerifyForm } from '@/features/reference-intervals/components/verify-form';
import { besideField } from '@/lib/form';
import { defaultAssayDefinitions, type StoredAssayDefinition } from '@/schemas/assay';

/*
 * The forms use the same shared schemas as the server (src/schemas), so bad input is named beside its field
 * before anything is sent, and a 400 from the server lands beside the same field.
 */

function renderInRouter(element: ReactNode) {
  const client = new QueryClient({ defaultOptions: { queries: { retry: false }, mutations: { retry: false } } });
  const router = createMemoryRouter([{ path: '/', element: <QueryClientProvider client={client}>{element}</QueryClientProvider> }]);
  render(<RouterProvider router={router} />);
}

function answer(status: number, body: unknown) {
  const fetchMock = vi.fn(async () => new Response(JSON.stringify(body), { status, headers: { 'content-type': 'application/json' } }));
  vi.stubGlobal('fetch', fetchMock);
  return fetchMock;
}

afterEach(() => vi.unstubAllGlobals());

describe('NewPatientForm', () => {
  it('when the family name hides a right-to-left override and the birth date is before 1900, then both are named beside their fields and nothing is sent', async () => {
    const fetchMock = answer(201, {});
    renderInRouter(<NewPatientForm initial={{}} onChosen={vi.fn()} onCancel={vi.fn()} />);
    fireEvent.change(screen.getByLabelText('Lab patient ID'), { target: { value: 'FX-UI-1' } });
    fireEvent.change(screen.getByLabelText('Family name'), { target: { value: 'Martin\u202Egpj' } });
    fireEvent.change(screen.getByLabelText('Given name(s)'), { target: { value: 'Alba' } });
    fireEvent.change(screen.getByLabelText('Date of birth'), { target: { value: '1899-12-31' } });
    fireEvent.submit(screen.getByRole('form', { name: 'New patient' }));
    expect(await screen.findByText(/Family name cannot contain control or text-direction characters \(found U\+202E/)).toBeInTheDocument();
    expect(screen.getByText('Date of birth cannot be before 1900-01-01')).toBeInTheDocument();
    expect(screen.getByLabelText('Family name')).toHaveAttribute('aria-invalid', 'true');
    expect(fetchMock).not.toHaveBeenCalled();
  });
});

describe('LabProfileForm', () => {
  const profile = {
    name: 'Example Mitochondrial Laboratory (fictitious)',
    addressLines: ['1 Test Way'],
    accreditationNumber: 'FX-0001',
    phone: null,
    timeZone: 'UTC',
    timeZoneNotice: 'The saved time zone "Europe/Londn" is not a known IANA zone, so Cristae reads and prints times in UTC.',
    allowSelfApproval: false,
    version: 3,
  };

  it('when the stored zone was not real, then the server notice shows beside the time zone field', async () => {
    answer(200, {});
    renderInRouter(<LabProfileForm profile={profile} />);
    expect(await screen.findByText(/"Europe\/Londn" is not a known IANA zone/)).toBeInTheDocument();
    expect(screen.getByLabelText('Time zone (IANA)')).toHaveAttribute('aria-invalid', 'true');
  });

  it('when a misspelt zone is typed, then the shared schema names it beside the field and nothing is sent', async () => {
    const fetchMock = answer(200, {});
    renderInRouter(<LabProfileForm profile={{ ...profile, timeZoneNotice: null }} />);
    fireEvent.change(screen.getByLabelText('Time zone (IANA)'), { target: { value: 'Europe/Londn' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save profile' }));
    expect(await screen.findByText(/Not a known IANA time zone/)).toBeInTheDocument();
    expect(fetchMock).not.toHaveBeenCalled();
  });
});

describe('VerifyForm', () => {
  it('when the local values use decimal commas, then the line is named beside the values and nothing is sent', async () => {
    const fetchMock = answer(200, {});
    renderInRouter(<VerifyForm />);
    fireEvent.change(screen.getByLabelText('Adopted lower limit'), { target: { value: '30' } });
    fireEvent.change(screen.getByLabelText('Adopted upper limit'), { target: { value: '50' } });
    fireEvent.change(screen.getByLabelText('Local reference values'), { target: { value: '37,5\n41,2\n39,9' } });
    fireEvent.click(screen.getByRole('button', { name: 'Check the interval' }));
    expect(await screen.findByText(/^Line 1: "37,5" looks like a decimal comma; use a point \(37\.5\)/)).toBeInTheDocument();
    expect(fetchMock).not.toHaveBeenCalled();
  });

  it('when the server refuses the second set, then its message shows beside that field', async () => {
    answer(400, {
      error: { code: 'VALIDATION_FAILED', message: 'Some fields are not valid', fields: { additionalValues: 'Line 3: "62,0" looks like a decimal comma; use a point (62.0)' } },
    });
    renderInRouter(<VerifyForm />);
    const column = Array.from({ length: 20 }, (_, i) => (40 + i * 0.1).toFixed(1)).join('\n');
    fireEvent.change(screen.getByLabelText('Adopted lower limit'), { target: { value: '30' } });
    fireEvent.change(screen.getByLabelText('Adopted upper limit'), { target: { value: '50' } });
    fireEvent.change(screen.getByLabelText('Local reference values'), { target: { value: column } });
    fireEvent.change(screen.getByLabelText('Second set (only if the first set failed)'), { target: { value: column } });
    fireEvent.click(screen.getByRole('button', { name: 'Check the interval' }));
    expect(await screen.findByText('Line 3: "62,0" looks like a decimal comma; use a point (62.0)')).toBeInTheDocument();
  });
});

describe('RateCheck', () => {
  const definitions: StoredAssayDefinition[] = defaultAssayDefinitions.map((definition, i) => ({
    id: i + 1,
    definition,
    status: 'approved',
    changeNote: null,
    createdBy: null,
    createdById: null,
    createdAt: '2026-01-01T00:00:00.000Z',
    approvedBy: null,
    approvedById: null,
    approvedAt: null,
    selfApproved: false,
  }));

  it('when the protein is negative, then the message under "Protein (mg/mL)" reads as words, not as the API field name, and nothing is sent', async () => {
    const fetchMock = answer(200, {});
    renderInRouter(<RateCheck definitions={definitions} />);
    fireEvent.change(screen.getByLabelText('Protein (mg/mL)'), { target: { value: '-4' } });
    fireEvent.change(screen.getByLabelText(/Total trace/), { target: { value: '0 1.2\n10 1.1\n20 1.0\n30 0.9' } });
    fireEvent.click(screen.getByRole('button', { name: 'Calculate' }));
    // The shared schema says "proteinMgPerMl must be at least 0.001 mg/mL", for API callers; the label names the field here.
    expect(await screen.findByText('Must be at least 0.001 mg/mL')).toBeInTheDocument();
    expect(screen.queryByText(/proteinMgPerMl/)).toBeNull();
    expect(screen.getByLabelText('Protein (mg/mL)')).toHaveAttribute('aria-invalid', 'true');
    expect(fetchMock).not.toHaveBeenCalled();
  });
});

describe('besideField', () => {
  it.each([
    ['proteinMgPerMl', 'proteinMgPerMl must be at least 0.001 mg/mL', 'Must be at least 0.001 mg/mL'],
    ['window.toS', 'window.toS must be after window.fromS', 'Must be after window.fromS'],
    ['window.fromS', 'fromS must be a number', 'Must be a number'],
    ['familyName', 'Family name cannot be empty', 'Family name cannot be empty'],
    ['total', 'totalled wrongly', 'totalled wrongly'],
  ])('%s: "%s" → "%s"', (path, message, shown) => {
    expect(besideField(path, message)).toBe(shown);
  });
});
