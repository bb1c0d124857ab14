import { FormFooter } from '@/components/ui/form-footer';
import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Link } from 'react-router-dom';
import { Button } from '@/components/ui/button';
import { TextArea, TextField } from '@/components/ui/field';
import { Card, Loading, Notice } from '@/components/ui/layout';
import { TableBox } from '@/components/ui/table-box';
import { paths } from '@/config/paths';
import { applyServerError, useZodForm } from '@/lib/form';
import { createControlMaterialBodySchema, type ControlMaterial } from '@/schemas/qc';
import { formatDay } from '@/utils/format';
import { qcQueries } from '../api/qc-queries';
import { useCreateControlMaterial } from '../api/use-create-control-material';
import { useUpdateControlMaterial } from '../api/use-update-control-material';

function NewMaterialForm({ onDone }: { onDone: () => void }) {
  const create = useCreateControlMaterial();
  const [message, setMessage] = useState<string | null>(null);
  const form = useZodForm(createControlMaterialBodySchema, {
    defaultValues: { name: '', lot: '', level: '', expiresOn: '', description: '' },
  });
  const { errors } = form.formState;
  return (
    <form
      noValidate
      aria-label="New control material"
      className="grid gap-3 sm:grid-cols-4"
      onSubmit={form.handleSubmit((values) => {
        setMessage(null);
        create.mutate(values, { onSuccess: onDone, onError: (err) => setMessage(applyServerError(form, err)) });
      })}
    >
      <div className="sm:col-span-2">
        <TextField label="Material" hint="e.g. pooled muscle homogenate" registration={form.register('name')} error={errors.name?.message} />
      </div>
      <TextField label="Lot" registration={form.register('lot')} error={errors.lot?.message} />
      <TextField label="Level" hint="e.g. Low, High" registration={form.register('level')} error={errors.level?.message} />
      <TextField label="Expires on" type="date" registration={form.register('expiresOn')} error={errors.expiresOn?.message} />
      <div className="sm:col-span-3">
        <TextArea label="Description (optional)" registration={form.register('description')} error={errors.description?.message} />
      </div>
      <FormFooter error={message} saving={create.isPending} saveLabel="Add the material" onCancel={onDone} columns={4} />
    </form>
  );
}

function RetireButton({ material }: { material: ControlMaterial }) {
  const update = useUpdateControlMaterial();
  const retired = material.retiredAt !== null;
  return (
    <>
      <Button
        variant="quiet"
        disabled={update.isPending}
        onClick={() => update.mutate({ id: material.id, body: { version: material.version, retired: !retired } })}
      >
        {retired ? 'Bring back' : 'Retire'}
        <span className="sr-only">{` ${material.name}, lot ${material.lot}, ${material.level}`}</span>
      </Button>
      {update.error ? <span className="text-xs text-below">{update.error.message}</span> : null}
    </>
  );
}

/** Every control material with its lot, level, expiry and the assays it has an approved target for. */
export function MaterialsOverview({ isDirector, today = new Date().toISOString().slice(0, 10) }: { isDirector: boolean; today?: string }) {
  const { data, isPending, error } = useQuery(qcQueries.materials());
  const [adding, setAdding] = useState(false);
  return (
    <Card
      title="Control materials"
      actions={isDirector && !adding ? <Button onClick={() => setAdding(true)}>New control material</Button> : null}
    >
      {adding ? (
        <div className="mb-5 rounded-md border border-paper-line p-4">
          <NewMaterialForm onDone={() => setAdding(false)} />
        </div>
      ) : null}
      {isPending ? <Loading what="Loading the control materials" /> : null}
      {error ? <Notice tone="error">The control materials could not be loaded.</Notice> : null}
      {data && data.length === 0 ? <p className="text-sm text-ink-soft">No control materials yet.</p> : null}
      {data && data.length > 0 ? (
        <TableBox label="Control materials">
          <table className="w-full text-sm">
            <thead>
              <tr className="border-b border-paper-line text-left text-xs uppercase tracking-wide text-ink-faint">
                <th className="py-1.5 pr-3">Material</th>
                <th className="py-1.5 pr-3">Lot</th>
                <th className="py-1.5 pr-3">Level</th>
                <th className="py-1.5 pr-3">Expires</th>
                <th className="py-1.5 pr-3">Targets in force</th>
                <th className="py-1.5 pr-3">State</th>
                {isDirector ? <th className="py-1.5 pr-3"><span className="sr-only">Actions</span></th> : null}
              </tr>
            </thead>
            <tbody>
              {data.map((m) => (
                <tr key={m.id} className="border-b border-paper-line/60 align-top">
                  <td className="py-1.5 pr-3">
                    <Link className="font-medium text-matrix-700 underline hover:text-matrix-900" to={paths.qcMaterial.href(m.id)}>
                      {m.name}
                    </Link>
                  </td>
                  <td className="py-1.5 pr-3 font-mono">{m.lot}</td>
                  <td className="py-1.5 pr-3">{m.level}</td>
                  <td className={`py-1.5 pr-3 whitespace-nowrap ${m.expiresOn < today ? 'text-below' : ''}`}>
                    {formatDay(m.expiresOn)}
                    {m.expiresOn < today ? ' (expired)' : ''}
                  </td>
                  <td className="py-1.5 pr-3">{m.approvedAssays.length ? m.approvedAssays.join(', ') : <span className="text-ink-faint">none</span>}</td>
                  <td className="py-1.5 pr-3">{m.retiredAt ? 'Retired' : 'In use'}</td>
                  {isDirector ? (
                    <td className="py-1.5 pr-3">
                      <RetireButton material={m} />
                    </td>
                  ) : null}
                </tr>
              ))}
            </tbody>
          </table>
        </TableBox>
      ) : null}
    </Card>
  );
}
