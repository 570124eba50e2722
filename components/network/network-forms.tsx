import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect } from 'react';
import { Controller, useForm, useWatch } from 'react-hook-form';
import {
  areaCreateBodySchema,
  channelCreateBodySchema,
  CHANNEL_KINDS,
  corridorCreateBodySchema,
  pmuCreateBodySchema,
  REPORTING_RATES,
  siteCreateBodySchema,
  trackCreateBodySchema,
  UNITS_OF_KIND,
  type Area,
  type Channel,
  type ChannelKind,
  type Corridor,
  type NetworkResponse,
  type Pmu,
  type Site,
  type Track,
} from '@/shared/api/network';
import { DEFAULT_LOW_BELOW, DEFAULT_POOR_BELOW } from '@/shared/bands';
import { useCreateAreaMutation, useDeleteAreaMutation, useUpdateAreaMutation } from '@/hooks/use-areas';
import { useCreateChannelMutation, useDeleteChannelMutation, useUpdateChannelMutation } from '@/hooks/use-channels';
import { useCreateCorridorMutation, useDeleteCorridorMutation, useUpdateCorridorMutation } from '@/hooks/use-corridors';
import { useCreatePmuMutation, useDeletePmuMutation, useUpdatePmuMutation } from '@/hooks/use-pmus';
import { useCreateSiteMutation, useDeleteSiteMutation, useUpdateSiteMutation } from '@/hooks/use-sites';
import { useCreateTrackMutation, useDeleteTrackMutation, useUpdateTrackMutation } from '@/hooks/use-tracks';
import { FieldRow } from '../forms/field-row';
import { FormNumberField, FormSelectField, FormTextField } from '../forms/form-fields';
import { SiteGroupPicker } from '../forms/site-group-picker';
import type { NetworkKindInfo } from './kinds';
import type { NetworkRow } from './network-lists';
import { RecordForm } from './record-form';

export interface KindFormProps {
  kind: NetworkKindInfo;
  record: NetworkRow | null;
  model: NetworkResponse;
  onDone: (message: string) => void;
  onCancel: () => void;
}

const CODE_HINT = 'Lower-case letters, digits and hyphens, e.g. "tarrow-valley".';

const byName = <T extends { name: string }>(rows: T[]) => [...rows].sort((a, b) => a.name.localeCompare(b.name));
const optionsOf = <T extends { id: number; name: string }>(rows: T[]) => byName(rows).map((r) => ({ value: String(r.id), label: r.name }));

/* The mutation objects are typed per resource; RecordForm only needs them to run. */
type AnyMutation = Parameters<typeof RecordForm>[0]['create'];
type AnyUpdate = Parameters<typeof RecordForm>[0]['update'];
type AnyRemove = Parameters<typeof RecordForm>[0]['remove'];
const m = {
  c: (x: unknown) => x as AnyMutation,
  u: (x: unknown) => x as AnyUpdate,
  r: (x: unknown) => x as AnyRemove,
};

// ---------------------------------------------------------------- areas
export function AreaForm({ record, ...p }: KindFormProps) {
  const rec = record as Area | null;
  const create = useCreateAreaMutation();
  const update = useUpdateAreaMutation();
  const remove = useDeleteAreaMutation();
  const form = useForm({
    resolver: zodResolver(areaCreateBodySchema),
    defaultValues: rec ? { code: rec.code, name: rec.name, description: rec.description } : { code: '', name: '', description: '' },
  });
  return (
    <RecordForm {...p} record={rec} form={form as never} fields={['code', 'name', 'description']} create={m.c(create)} update={m.u(update)} remove={m.r(remove)}>
      {(submit) => (
        <>
          <FormTextField control={form.control} name="name" label="Name" required onSubmitEditing={submit} />
          <FormTextField control={form.control} name="code" label="Code" required mono autoCapitalize="none" hint={CODE_HINT} onSubmitEditing={submit} />
          <FormTextField control={form.control} name="description" label="Description" onSubmitEditing={submit} />
        </>
      )}
    </RecordForm>
  );
}

// ---------------------------------------------------------------- sites
export function SiteForm({ record, model, ...p }: KindFormProps) {
  const rec = record as Site | null;
  const create = useCreateSiteMutation();
  const update = useUpdateSiteMutation();
  const remove = useDeleteSiteMutation();
  const form = useForm({
    resolver: zodResolver(siteCreateBodySchema),
    defaultValues: rec
      ? { code: rec.code, name: rec.name, areaId: rec.areaId, kV: rec.kV, x: rec.x, y: rec.y }
      : { code: '', name: '', areaId: undefined as unknown as number, kV: undefined as unknown as number, x: 50, y: 50 },
  });
  return (
    <RecordForm {...p} record={rec} form={form as never} fields={['code', 'name', 'areaId', 'kV', 'x', 'y']} create={m.c(create)} update={m.u(update)} remove={m.r(remove)}>
      {(submit) => (
        <>
          <FormTextField control={form.control} name="name" label="Name" required onSubmitEditing={submit} />
          <FormTextField control={form.control} name="code" label="Code" required mono autoCapitalize="none" hint={CODE_HINT} onSubmitEditing={submit} />
          <FormSelectField control={form.control} name="areaId" label="Area" numeric required options={optionsOf(model.areas)} placeholder="Choose an area" />
          <FormNumberField control={form.control} name="kV" label="Voltage" unit="kV" required onSubmitEditing={submit} />
          <FieldRow>
            <FormNumberField control={form.control} name="x" label="Schematic x" hint="0–100, west to east" onSubmitEditing={submit} />
            <FormNumberField control={form.control} name="y" label="Schematic y" hint="0–100, south to north" onSubmitEditing={submit} />
          </FieldRow>
        </>
      )}
    </RecordForm>
  );
}

// ---------------------------------------------------------------- PMUs
export function PmuForm({ record, model, ...p }: KindFormProps) {
  const rec = record as Pmu | null;
  const create = useCreatePmuMutation();
  const update = useUpdatePmuMutation();
  const remove = useDeletePmuMutation();
  const form = useForm({
    resolver: zodResolver(pmuCreateBodySchema),
    defaultValues: rec
      ? { code: rec.code, name: rec.name, siteId: rec.siteId, reportingRate: rec.reportingRate, description: rec.description }
      : { code: '', name: '', siteId: undefined as unknown as number, reportingRate: 30, description: '' },
  });
  return (
    <RecordForm {...p} record={rec} form={form as never} fields={['code', 'name', 'siteId', 'reportingRate', 'description']} create={m.c(create)} update={m.u(update)} remove={m.r(remove)}>
      {(submit) => (
        <>
          <FormTextField control={form.control} name="name" label="Name" required onSubmitEditing={submit} />
          <FormTextField control={form.control} name="code" label="Code" required mono autoCapitalize="none" hint={CODE_HINT} onSubmitEditing={submit} />
          <FormSelectField control={form.control} name="siteId" label="Site" numeric required options={optionsOf(model.sites)} placeholder="Choose a site" />
          <FormSelectField
            control={form.control}
            name="reportingRate"
            label="Reporting rate"
            numeric
            required
            options={REPORTING_RATES.map((r) => ({ value: String(r), label: `${r} frames/s` }))}
          />
          <FormTextField control={form.control} name="description" label="Description" onSubmitEditing={submit} />
        </>
      )}
    </RecordForm>
  );
}

// ---------------------------------------------------------------- channels
export function ChannelForm({ record, model, ...p }: KindFormProps) {
  const rec = record as Channel | null;
  const create = useCreateChannelMutation();
  const update = useUpdateChannelMutation();
  const remove = useDeleteChannelMutation();
  const form = useForm({
    resolver: zodResolver(channelCreateBodySchema),
    defaultValues: rec
      ? { name: rec.name, siteId: rec.siteId, pmuId: rec.pmuId, kind: rec.kind, unit: rec.unit, description: rec.description }
      : { name: '', siteId: undefined as unknown as number, pmuId: null, kind: 'angle' as ChannelKind, unit: 'deg' as const, description: '' },
  });
  const [siteId, kind, unit] = useWatch({ control: form.control, name: ['siteId', 'kind', 'unit'] });
  // Each kind has its own units; keep the unit valid when the kind changes.
  useEffect(() => {
    const allowed = UNITS_OF_KIND[kind as ChannelKind] ?? [];
    if (allowed.length > 0 && !allowed.includes(unit)) form.setValue('unit', allowed[0]);
  }, [kind, unit, form]);
  const pmus = model.pmus.filter((x) => siteId == null || x.siteId === siteId);
  return (
    <RecordForm {...p} record={rec} form={form as never} fields={['name', 'siteId', 'pmuId', 'kind', 'unit', 'description']} create={m.c(create)} update={m.u(update)} remove={m.r(remove)}>
      {(submit) => (
        <>
          <FormTextField
            control={form.control}
            name="name"
            label="Name"
            required
            mono
            autoCapitalize="none"
            hint='The column name in uploaded files, e.g. "moorgate.angle".'
            onSubmitEditing={submit}
          />
          <FormSelectField control={form.control} name="siteId" label="Site" numeric required options={optionsOf(model.sites)} placeholder="Choose a site" />
          <FormSelectField control={form.control} name="pmuId" label="PMU" numeric noneLabel="No PMU" options={optionsOf(pmus)} />
          <FieldRow>
            <FormSelectField control={form.control} name="kind" label="Kind" required options={CHANNEL_KINDS.map((k) => ({ value: k, label: k }))} />
            <FormSelectField
              control={form.control}
              name="unit"
              label="Unit"
              required
              options={(UNITS_OF_KIND[kind as ChannelKind] ?? []).map((u) => ({ value: u, label: u }))}
            />
          </FieldRow>
          <FormTextField control={form.control} name="description" label="Description" onSubmitEditing={submit} />
        </>
      )}
    </RecordForm>
  );
}

// ---------------------------------------------------------------- corridors
export function CorridorForm({ record, model, ...p }: KindFormProps) {
  const rec = record as Corridor | null;
  const create = useCreateCorridorMutation();
  const update = useUpdateCorridorMutation();
  const remove = useDeleteCorridorMutation();
  const form = useForm({
    resolver: zodResolver(corridorCreateBodySchema),
    defaultValues: rec
      ? {
          code: rec.code,
          name: rec.name,
          fromSiteId: rec.fromSiteId,
          toSiteId: rec.toSiteId,
          kV: rec.kV,
          flowChannelId: rec.flowChannelId,
          fromAngleChannelId: rec.fromAngleChannelId,
          toAngleChannelId: rec.toAngleChannelId,
        }
      : {
          code: '',
          name: '',
          fromSiteId: undefined as unknown as number,
          toSiteId: undefined as unknown as number,
          kV: undefined as unknown as number,
          flowChannelId: null,
          fromAngleChannelId: null,
          toAngleChannelId: null,
        },
  });
  const flows = model.channels.filter((c) => c.kind === 'flow');
  const angles = model.channels.filter((c) => c.kind === 'angle');
  return (
    <RecordForm
      {...p}
      record={rec}
      form={form as never}
      fields={['code', 'name', 'fromSiteId', 'toSiteId', 'kV', 'flowChannelId', 'fromAngleChannelId', 'toAngleChannelId']}
      create={m.c(create)}
      update={m.u(update)}
      remove={m.r(remove)}
    >
      {(submit) => (
        <>
          <FormTextField control={form.control} name="name" label="Name" required onSubmitEditing={submit} />
          <FormTextField control={form.control} name="code" label="Code" required mono autoCapitalize="none" hint={CODE_HINT} onSubmitEditing={submit} />
          <FieldRow>
            <FormSelectField control={form.control} name="fromSiteId" label="From site" numeric required options={optionsOf(model.sites)} placeholder="Choose a site" />
            <FormSelectField control={form.control} name="toSiteId" label="To site" numeric required options={optionsOf(model.sites)} placeholder="Choose a site" />
          </FieldRow>
          <FormNumberField control={form.control} name="kV" label="Voltage" unit="kV" required onSubmitEditing={submit} />
          <FormSelectField control={form.control} name="flowChannelId" label="Flow channel" numeric noneLabel="None" options={optionsOf(flows)} />
          <FieldRow>
            <FormSelectField control={form.control} name="fromAngleChannelId" label="From-end angle channel" numeric noneLabel="None" options={optionsOf(angles)} />
            <FormSelectField control={form.control} name="toAngleChannelId" label="To-end angle channel" numeric noneLabel="None" options={optionsOf(angles)} />
          </FieldRow>
        </>
      )}
    </RecordForm>
  );
}

// ---------------------------------------------------------------- mode tracks
export function TrackForm({ record, model, ...p }: KindFormProps) {
  const rec = record as Track | null;
  const create = useCreateTrackMutation();
  const update = useUpdateTrackMutation();
  const remove = useDeleteTrackMutation();
  const form = useForm({
    resolver: zodResolver(trackCreateBodySchema),
    defaultValues: rec
      ? {
          code: rec.code,
          name: rec.name,
          description: rec.description,
          minHz: rec.minHz,
          maxHz: rec.maxHz,
          poorBelow: rec.poorBelow,
          lowBelow: rec.lowBelow,
          corridorId: rec.corridorId,
          reference: { groupA: [...rec.reference.groupA], groupB: [...rec.reference.groupB] },
        }
      : {
          code: '',
          name: '',
          description: '',
          minHz: undefined as unknown as number,
          maxHz: undefined as unknown as number,
          poorBelow: DEFAULT_POOR_BELOW,
          lowBelow: DEFAULT_LOW_BELOW,
          corridorId: null,
          reference: { groupA: [] as string[], groupB: [] as string[] },
        },
  });
  const sites = byName(model.sites).map((s) => ({ code: s.code, name: s.name }));
  return (
    <RecordForm
      {...p}
      record={rec}
      form={form as never}
      fields={['code', 'name', 'description', 'minHz', 'maxHz', 'poorBelow', 'lowBelow', 'corridorId', 'reference.groupA', 'reference.groupB', 'reference']}
      create={m.c(create)}
      update={m.u(update)}
      remove={m.r(remove)}
    >
      {(submit) => (
        <>
          <FormTextField control={form.control} name="name" label="Name" required onSubmitEditing={submit} />
          <FormTextField control={form.control} name="code" label="Code" required mono autoCapitalize="none" hint={CODE_HINT} onSubmitEditing={submit} />
          <FormTextField control={form.control} name="description" label="Description" onSubmitEditing={submit} />
          <FieldRow>
            <FormNumberField control={form.control} name="minHz" label="Lowest frequency" unit="Hz" required onSubmitEditing={submit} />
            <FormNumberField control={form.control} name="maxHz" label="Highest frequency" unit="Hz" required onSubmitEditing={submit} />
          </FieldRow>
          <FieldRow>
            <FormNumberField control={form.control} name="poorBelow" label="Poor below" unit="%" required hint="Damping under this is poor." onSubmitEditing={submit} />
            <FormNumberField control={form.control} name="lowBelow" label="Low below" unit="%" required hint="Under this (and not poor) is low." onSubmitEditing={submit} />
          </FieldRow>
          <FormSelectField control={form.control} name="corridorId" label="Corridor" numeric noneLabel="None" options={optionsOf(model.corridors)} />
          <Controller
            control={form.control}
            name="reference.groupA"
            render={({ field, fieldState }) => (
              <SiteGroupPicker
                label="Group A sites (swing together)"
                groupName="group A"
                sites={sites}
                value={field.value ?? []}
                onChange={(codes) => {
                  field.onChange(codes);
                  // A site belongs to one group at most.
                  const b = form.getValues('reference.groupB') ?? [];
                  form.setValue('reference.groupB', b.filter((c: string) => !codes.includes(c)));
                }}
                error={fieldState.error?.message}
              />
            )}
          />
          <Controller
            control={form.control}
            name="reference.groupB"
            render={({ field, fieldState }) => (
              <SiteGroupPicker
                label="Group B sites (swing against group A)"
                groupName="group B"
                sites={sites}
                value={field.value ?? []}
                onChange={(codes) => {
                  field.onChange(codes);
                  const a = form.getValues('reference.groupA') ?? [];
                  form.setValue('reference.groupA', a.filter((c: string) => !codes.includes(c)));
                }}
                error={fieldState.error?.message}
              />
            )}
          />
        </>
      )}
    </RecordForm>
  );
}

export const FORM_OF = {
  areas: AreaForm,
  sites: SiteForm,
  pmus: PmuForm,
  channels: ChannelForm,
  corridors: CorridorForm,
  tracks: TrackForm,
} as const;
