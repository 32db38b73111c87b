import { useEffect, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import { ApiError } from '../../lib/api-client.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { useUpdateSettings } from './api/update-settings.ts';

/**
 * /admin/settings: the lab settings as stored, and the choice of calibrated volumes in budgets. A change is saved
 * through PUT /api/settings, which records one audit entry per changed key with its old and new value.
 */
export function SettingsPage() {
  const settings = useQuery(settingsQueries.detail());
  const update = useUpdateSettings();
  const [useCalibrated, setUseCalibrated] = useState(false);
  const [saved, setSaved] = useState(false);

  useEffect(() => {
    if (settings.data) setUseCalibrated(settings.data.useCalibratedVolumes === true);
  }, [settings.data]);

  if (settings.isPending) return <Spinner label="Loading the lab settings…" />;
  if (settings.isError) return <Banner title="The lab settings could not be loaded">{settings.error.message}</Banner>;
  const s = settings.data;
  const stored = s.useCalibratedVolumes === true;
  const fieldError = update.error instanceof ApiError ? update.error.fields.useCalibratedVolumes : undefined;

  return (
    <div className="flex flex-col gap-6">
      <PageHeader title="Lab settings" />
      <Panel title="Laboratory">
        <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[auto_minmax(0,1fr)]" data-testid="settings-summary">
          <dt className="font-semibold text-ink-soft">Name</dt>
          <dd>{s.labName}</dd>
          <dt className="font-semibold text-ink-soft">Identifier prefix</dt>
          <dd className="num">{s.idPrefix}</dd>
          <dt className="font-semibold text-ink-soft">Time zone</dt>
          <dd>{s.timeZone}</dd>
          <dt className="font-semibold text-ink-soft">Rounding rule</dt>
          <dd>{s.roundingRule}</dd>
          <dt className="font-semibold text-ink-soft">Reading window</dt>
          <dd className="num">± {s.readingWindowPct} %</dd>
        </dl>
      </Panel>
      <Panel title="Volumes in uncertainty budgets">
        <form
          className="flex flex-col gap-4"
          onSubmit={(e) => {
            e.preventDefault();
            setSaved(false);
            update.mutate({ useCalibratedVolumes: useCalibrated }, { onSuccess: () => setSaved(true) });
          }}
        >
          <label
            htmlFor="useCalibratedVolumes"
            className="flex min-h-14 cursor-pointer items-center gap-4 rounded-lg border-2 border-line bg-card px-4 py-3 has-[:checked]:border-slate-700 has-[:checked]:bg-slate-100"
          >
            <input
              id="useCalibratedVolumes"
              type="checkbox"
              checked={useCalibrated}
              onChange={(e) => {
                setUseCalibrated(e.target.checked);
                setSaved(false);
              }}
              aria-describedby="useCalibratedVolumes-hint"
              aria-invalid={fieldError ? true : undefined}
              data-testid="setting-use-calibrated-volumes"
              className="size-7 shrink-0 accent-slate-700"
            />
            <span>
              <span className="block text-lg font-semibold">Use the calibrated volume of checked flasks and pipettes</span>
              <span id="useCalibratedVolumes-hint" className="block text-ink-soft">
                When a flask or pipette has a verified, passed volume check that is in date and tested the volume used, new preparations use the check&apos;s mean volume at
                20 °C and its standard uncertainty (U/k) instead of the nominal volume and the class tolerance. The budget names the check. Records already written keep
                the volumes they were computed with.
              </span>
            </span>
          </label>
          {fieldError ? (
            <p className="font-semibold text-bad-700" role="alert">
              {fieldError}
            </p>
          ) : null}
          {update.isError && !fieldError ? <Banner title="Not saved">{update.error.message}</Banner> : null}
          {saved ? (
            <Banner tone="ok" testId="settings-saved">
              Saved: calibrated volumes are {stored ? 'used' : 'not used'} for new preparations. The change is in the audit trail.
            </Banner>
          ) : null}
          <div>
            <Button type="submit" busy={update.isPending} disabled={useCalibrated === stored} data-testid="settings-save">
              Save
            </Button>
          </div>
        </form>
      </Panel>
    </div>
  );
}
