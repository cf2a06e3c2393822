import { reactive, ref, type Ref } from 'vue';
import { SurveyFields, type SurveyInput } from '@shared/schemas/surveys';
import { useFieldErrors } from './useFieldErrors';
import { ApiError } from '@/api/client';
import { jobWork } from '@/api/job-work';

export type SurveyDraft = Required<Omit<SurveyInput, 'surveyedAt' | 'accessWidthMm' | 'groundType'>> & {
  accessWidthMm: number | null;
  groundType: SurveyInput['groundType'] | null;
};

const blank = (): SurveyDraft => ({
  accessWidthMm: null,
  accessHeightMm: null,
  steps: 0,
  gates: 0,
  overheadObstructions: false,
  overheadNotes: null,
  groundType: null,
  buriedServicesNotes: null,
  craneStandingPosition: null,
  unitFacing: null,
  craneDistanceToSetDownM: null,
  consumerUnitDistanceM: null,
  consumerUnitLocation: null,
  mainFuseAmps: null,
  drainage: null,
  craneRequired: null,
  excavatorSize: null,
  evChargerAmps: null,
  electricShowerAmps: null,
  heatPumpAmps: null,
  otherLargeLoadAmps: null,
  otherLargeLoadNotes: null,
  earthingArrangement: null,
  hoseFlowLitresPerMinute: null,
  siteLatitude: null,
  siteLongitude: null,
  notes: null,
});

/** Degrees to five places (about a metre): more than a forecast needs, and no false precision. */
const fivePlaces = (deg: number) => Math.round(deg * 1e5) / 1e5;

/**
 * The survey form's state: loads the saved survey (or starts a blank one), checks the draft with the
 * same schema the server uses, and saves against the version it loaded.
 */
export function useSurveyForm(jobId: Ref<string>) {
  const draft = reactive<SurveyDraft>(blank());
  const version = ref(0);
  const fieldErrors = useFieldErrors();
  const errors = fieldErrors.errors;
  const loading = ref(true);
  const saving = ref(false);
  const loadError = ref<ApiError | null>(null);

  async function load(): Promise<void> {
    loading.value = true;
    loadError.value = null;
    try {
      const saved = await jobWork.survey(jobId.value);
      const { jobId: _j, surveyedAt: _a, surveyedBy: _b, version: v, ...fields } = saved;
      Object.assign(draft, fields);
      version.value = v;
    } catch (error) {
      if (error instanceof ApiError && error.status === 404) Object.assign(draft, blank());
      else
        loadError.value =
          error instanceof ApiError ? error : new ApiError({ status: 0, title: 'Something went wrong' });
    } finally {
      loading.value = false;
    }
  }

  // Empty text boxes mean "nothing recorded".
  const cleaned = () =>
    Object.fromEntries(Object.entries(draft).map(([k, v]) => [k, typeof v === 'string' && v.trim() === '' ? null : v]));

  /** Checks the draft; returns the parsed fields, or null with `errors` filled in per field. */
  function check() {
    return fieldErrors.check(SurveyFields.safeParse(cleaned()));
  }

  async function save(): Promise<boolean> {
    const fields = check();
    if (!fields) return false;
    saving.value = true;
    try {
      const saved = await jobWork.saveSurvey(jobId.value, version.value, fields);
      version.value = saved.version;
      return true;
    } catch (error) {
      fieldErrors.take(error, 'survey');
      throw error;
    } finally {
      saving.value = false;
    }
  }

  const locating = ref(false);
  /**
   * Fills the site position from the phone's location (the browser asks the person first). Resolves
   * to null when done, or to the reason in words when the position could not be had.
   */
  async function useHerePosition(): Promise<string | null> {
    if (typeof navigator === 'undefined' || !navigator.geolocation)
      return 'This browser cannot tell where it is; type the position instead.';
    locating.value = true;
    try {
      const pos = await new Promise<GeolocationPosition>((resolve, reject) =>
        navigator.geolocation.getCurrentPosition(resolve, reject, {
          enableHighAccuracy: false,
          timeout: 15_000,
          maximumAge: 60_000,
        }),
      );
      draft.siteLatitude = fivePlaces(pos.coords.latitude);
      draft.siteLongitude = fivePlaces(pos.coords.longitude);
      return null;
    } catch (error) {
      const code = (error as GeolocationPositionError | undefined)?.code;
      return code === 1
        ? 'Location was not allowed on this phone; type the position instead.'
        : 'The position could not be found; try again outside, or type it.';
    } finally {
      locating.value = false;
    }
  }

  return {
    draft,
    version,
    errors,
    fields: fieldErrors,
    loading,
    saving,
    loadError,
    locating,
    load,
    check,
    save,
    useHerePosition,
  };
}
