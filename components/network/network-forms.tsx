import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, type ReactNode } from 'react';
import { Controller, useForm, useWatch, type Resolver, type UseFormReturn } from 'react-hook-form';
import type { z } from 'zod';
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
  type ChannelKind,
  type NetworkResponse,
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
import type { SelectOption } from '../select-field';
import type { NetworkKind, NetworkKindInfo } from './kinds';
import type { NetworkRow } from './network-lists';
import { RecordForm, type RecordFormProps } from './record-form';

// Each kind of record is described once below (its fields, their labels and a blank record);
// NetworkForm draws any of them inside RecordForm. Values follow the shared create schemas, which
// are also the client-side check, so a form refuses what the server would in the same words.

type Values = Record<string, unknown>;

interface Labelled {
  name: string;
  label: string;
  required?: boolean;
}
type Field =
  /** `mono`: an identifier (code, channel name): set in the mono face, never auto-capitalised. */
  | (Labelled & { type: 'text'; mono?: boolean; hint?: string })
  | (Labelled & { type: 'number'; unit?: string; hint?: string })
  | (Labelled & {
      type: 'select';
      /** The choices, from the network model and the values typed so far. */
      options: (model: NetworkResponse, values: Values) => SelectOption[];
      /** Values are ids: the chosen option goes back as a number. */
      numeric?: boolean;
      noneLabel?: string;
      placeholder?: string;
      /** When the choices change under it, move to the first choice rather than keep an invalid one. */
      followChoices?: boolean;
    })
  /** Site codes that swing together; a site belongs to this group or `other`, not both. */
  | { type: 'siteGroup'; name: string; other: string; label: string; groupName: string }
  /** Short fields side by side on wide screens. */
  | { type: 'row'; fields: Field[] };

type Mutations = [() => RecordFormProps<Values>['create'], () => RecordFormProps<Values>['update'], () => RecordFormProps<Values>['remove']];

interface FormSpec {
  schema: z.ZodType;
  /** Create, update and delete hooks of the kind's resource. */
  mutations: Mutations;
  /** A new record's values; its keys are also what is taken from a stored record to edit it. */
  blank: Values;
  fields: Field[];
}

/* The hooks are typed per resource; RecordForm only runs them with the schema's output. */
const mutations = (create: () => unknown, update: () => unknown, remove: () => unknown) => [create, update, remove] as unknown as Mutations;

const byName = <T extends { name: string }>(rows: T[]) => [...rows].sort((a, b) => a.name.localeCompare(b.name));
const optionsOf = <T extends { id: number; name: string }>(rows: T[]) => byName(rows).map((r) => ({ value: String(r.id), label: r.name }));

const NAME: Field = { type: 'text', name: 'name', label: 'Name', required: true };
const CODE: Field = { type: 'text', name: 'code', label: 'Code', required: true, mono: true, hint: 'Lower-case letters, digits and hyphens, e.g. "tarrow-valley".' };
const DESCRIPTION: Field = { type: 'text', name: 'description', label: 'Description' };
const VOLTAGE: Field = { type: 'number', name: 'kV', label: 'Voltage', unit: 'kV', required: true };
const siteChoice = (name: string, label: string): Field => ({
  type: 'select',
  name,
  label,
  numeric: true,
  required: true,
  options: (m) => optionsOf(m.sites),
  placeholder: 'Choose a site',
});
const channelChoice = (name: string, label: string, kind: ChannelKind): Field => ({
  type: 'select',
  name,
  label,
  numeric: true,
  noneLabel: 'None',
  options: (m) => optionsOf(m.channels.filter((c) => c.kind === kind)),
});

export const FORMS: Record<NetworkKind, FormSpec> = {
  areas: {
    schema: areaCreateBodySchema,
    mutations: mutations(useCreateAreaMutation, useUpdateAreaMutation, useDeleteAreaMutation),
    blank: { code: '', name: '', description: '' },
    fields: [NAME, CODE, DESCRIPTION],
  },
  sites: {
    schema: siteCreateBodySchema,
    mutations: mutations(useCreateSiteMutation, useUpdateSiteMutation, useDeleteSiteMutation),
    // The middle of the schematic, so a new site is visible before it is placed.
    blank: { code: '', name: '', areaId: undefined, kV: undefined, x: 50, y: 50 },
    fields: [
      NAME,
      CODE,
      { type: 'select', name: 'areaId', label: 'Area', numeric: true, required: true, options: (m) => optionsOf(m.areas), placeholder: 'Choose an area' },
      VOLTAGE,
      {
        type: 'row',
        fields: [
          { type: 'number', name: 'x', label: 'Schematic x', hint: '0–100, west to east' },
          { type: 'number', name: 'y', label: 'Schematic y', hint: '0–100, south to north' },
        ],
      },
    ],
  },
  pmus: {
    schema: pmuCreateBodySchema,
    mutations: mutations(useCreatePmuMutation, useUpdatePmuMutation, useDeletePmuMutation),
    // The demo grid's reporting rate (IEEE C37.118.1 rate for 60 Hz systems).
    blank: { code: '', name: '', siteId: undefined, reportingRate: 30, description: '' },
    fields: [
      NAME,
      CODE,
      siteChoice('siteId', 'Site'),
      {
        type: 'select',
        name: 'reportingRate',
        label: 'Reporting rate',
        numeric: true,
        required: true,
        options: () => REPORTING_RATES.map((r) => ({ value: String(r), label: `${r} frames/s` })),
      },
      DESCRIPTION,
    ],
  },
  channels: {
    schema: channelCreateBodySchema,
    mutations: mutations(useCreateChannelMutation, useUpdateChannelMutation, useDeleteChannelMutation),
    blank: { name: '', siteId: undefined, pmuId: null, kind: 'angle', unit: 'deg', description: '' },
    fields: [
      { type: 'text', name: 'name', label: 'Name', required: true, mono: true, hint: 'The column name in uploaded files, e.g. "moorgate.angle".' },
      siteChoice('siteId', 'Site'),
      {
        type: 'select',
        name: 'pmuId',
        label: 'PMU',
        numeric: true,
        noneLabel: 'No PMU',
        // A channel's PMU stands at the channel's site.
        options: (m, v) => optionsOf(m.pmus.filter((x) => v.siteId == null || x.siteId === v.siteId)),
      },
      {
        type: 'row',
        fields: [
          { type: 'select', name: 'kind', label: 'Kind', required: true, options: () => CHANNEL_KINDS.map((k) => ({ value: k, label: k })) },
          // Each kind has its own units.
          {
            type: 'select',
            name: 'unit',
            label: 'Unit',
            required: true,
            followChoices: true,
            options: (_m, v) => (UNITS_OF_KIND[v.kind as ChannelKind] ?? []).map((u) => ({ value: u, label: u })),
          },
        ],
      },
      DESCRIPTION,
    ],
  },
  corridors: {
    schema: corridorCreateBodySchema,
    mutations: mutations(useCreateCorridorMutation, useUpdateCorridorMutation, useDeleteCorridorMutation),
    blank: {
      code: '',
      name: '',
      fromSiteId: undefined,
      toSiteId: undefined,
      kV: undefined,
      flowChannelId: null,
      fromAngleChannelId: null,
      toAngleChannelId: null,
    },
    fields: [
      NAME,
      CODE,
      { type: 'row', fields: [siteChoice('fromSiteId', 'From site'), siteChoice('toSiteId', 'To site')] },
      VOLTAGE,
      channelChoice('flowChannelId', 'Flow channel', 'flow'),
      {
        type: 'row',
        fields: [channelChoice('fromAngleChannelId', 'From-end angle channel', 'angle'), channelChoice('toAngleChannelId', 'To-end angle channel', 'angle')],
      },
    ],
  },
  tracks: {
    schema: trackCreateBodySchema,
    mutations: mutations(useCreateTrackMutation, useUpdateTrackMutation, useDeleteTrackMutation),
    blank: {
      code: '',
      name: '',
      description: '',
      minHz: undefined,
      maxHz: undefined,
      poorBelow: DEFAULT_POOR_BELOW,
      lowBelow: DEFAULT_LOW_BELOW,
      corridorId: null,
      reference: { groupA: [], groupB: [] },
    },
    fields: [
      NAME,
      CODE,
      DESCRIPTION,
      {
        type: 'row',
        fields: [
          { type: 'number', name: 'minHz', label: 'Lowest frequency', unit: 'Hz', required: true },
          { type: 'number', name: 'maxHz', label: 'Highest frequency', unit: 'Hz', required: true },
        ],
      },
      {
        type: 'row',
        fields: [
          { type: 'number', name: 'poorBelow', label: 'Poor below', unit: '%', required: true, hint: 'Damping under this is poor.' },
          { type: 'number', name: 'lowBelow', label: 'Low below', unit: '%', required: true, hint: 'Under this (and not poor) is low.' },
        ],
      },
      { type: 'select', name: 'corridorId', label: 'Corridor', numeric: true, noneLabel: 'None', options: (m) => optionsOf(m.corridors) },
      { type: 'siteGroup', name: 'reference.groupA', other: 'reference.groupB', label: 'Group A sites (swing together)', groupName: 'group A' },
      { type: 'siteGroup', name: 'reference.groupB', other: 'reference.groupA', label: 'Group B sites (swing against group A)', groupName: 'group B' },
    ],
  },
};

const leaves = (fields: Field[]): Exclude<Field, { type: 'row' }>[] => fields.flatMap((f) => (f.type === 'row' ? leaves(f.fields) : [f]));

/**
 * Where the server's 400 details may land: the fields as drawn, then the blank record's own keys.
 * Nested fields come first so "reference.groupA.0" finds the group picker before "reference".
 */
function errorPaths(spec: FormSpec): string[] {
  const drawn = leaves(spec.fields).map((f) => f.name);
  return [...drawn, ...Object.keys(spec.blank).filter((k) => !drawn.includes(k))];
}

/** The stored record as form values, copied so the form never edits the cached network model. */
function valuesOf(spec: FormSpec, record: NetworkRow | null): Values {
  const source = (record ?? spec.blank) as Values;
  return Object.fromEntries(Object.keys(spec.blank).map((k) => [k, copy(source[k])]));
}

function copy(v: unknown): unknown {
  return v !== null && typeof v === 'object' ? JSON.parse(JSON.stringify(v)) : v;
}

export interface NetworkFormProps {
  kind: NetworkKindInfo;
  record: NetworkRow | null;
  model: NetworkResponse;
  onDone: (message: string) => void;
  onCancel: () => void;
}

/** Create, edit or delete one record of any kind, as FORMS describes it. */
export function NetworkForm({ kind, record, model, ...p }: NetworkFormProps) {
  const spec = FORMS[kind.key];
  const [useCreate, useUpdate, useRemove] = spec.mutations;
  const create = useCreate();
  const update = useUpdate();
  const remove = useRemove();
  const form = useForm<Values>({ resolver: zodResolver(spec.schema as never) as Resolver<Values>, defaultValues: valuesOf(spec, record) });
  const values = useWatch({ control: form.control }) as Values;

  useEffect(() => {
    for (const f of leaves(spec.fields)) {
      if (f.type !== 'select' || !f.followChoices) continue;
      const choices = f.options(model, values).map((o) => o.value);
      if (choices.length > 0 && !choices.includes(String(values[f.name]))) form.setValue(f.name, f.numeric ? Number(choices[0]) : choices[0]);
    }
  }, [spec, model, values, form]);

  return (
    <RecordForm {...p} kind={kind} record={record} form={form} fields={errorPaths(spec)} create={create} update={update} remove={remove}>
      {(submit) => spec.fields.map((f, i) => draw(f, String(i), { form, model, values, submit }))}
    </RecordForm>
  );
}

interface DrawContext {
  form: UseFormReturn<Values>;
  model: NetworkResponse;
  values: Values;
  /** For Enter in a text or number field. */
  submit: () => void;
}

function draw(f: Field, key: string, c: DrawContext): ReactNode {
  if (f.type === 'row') {
    // FieldRow gives each of its children a cell, so the row's fields go in as a list.
    return <FieldRow key={key}>{f.fields.map((g, i) => draw(g, `${key}.${i}`, c))}</FieldRow>;
  }
  if (f.type === 'siteGroup') return <SiteGroupField key={key} field={f} form={c.form} model={c.model} />;
  const bound = { control: c.form.control, name: f.name, label: f.label, required: f.required };
  if (f.type === 'select') {
    return (
      <FormSelectField key={key} {...bound} numeric={f.numeric} noneLabel={f.noneLabel} placeholder={f.placeholder} options={f.options(c.model, c.values)} />
    );
  }
  if (f.type === 'number') return <FormNumberField key={key} {...bound} unit={f.unit} hint={f.hint} onSubmitEditing={c.submit} />;
  return <FormTextField key={key} {...bound} mono={f.mono} autoCapitalize={f.mono ? 'none' : undefined} hint={f.hint} onSubmitEditing={c.submit} />;
}

function SiteGroupField({ field: f, form, model }: { field: Extract<Field, { type: 'siteGroup' }>; form: UseFormReturn<Values>; model: NetworkResponse }) {
  const sites = byName(model.sites).map((s) => ({ code: s.code, name: s.name }));
  return (
    <Controller
      control={form.control}
      name={f.name}
      render={({ field, fieldState }) => (
        <SiteGroupPicker
          label={f.label}
          groupName={f.groupName}
          sites={sites}
          value={(field.value as string[] | undefined) ?? []}
          onChange={(codes) => {
            field.onChange(codes);
            // A site belongs to one group at most.
            const other = (form.getValues(f.other) as string[] | undefined) ?? [];
            form.setValue(f.other, other.filter((c) => !codes.includes(c)));
          }}
          error={fieldState.error?.message}
        />
      )}
    />
  );
}
