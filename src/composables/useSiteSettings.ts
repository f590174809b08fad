import { ref, type Ref } from 'vue';
import { ApiError, errorMessage } from '@/api/client';
import { getSiteSettings, updateSiteSettings, type SettingsChange, type SiteSettings } from '@/api/settings.api';
import { fieldErrorsFrom, type DraftField } from '@/components/settings/settings-rules';
import { useAsync } from './useAsync';

/**
 * A site's settings as `{ data, isLoading, error, run }`, plus `save` that sends a change and, on
 * success, replaces `data` with the settings as they apply afterwards. A refused change leaves
 * `data` as it was and puts the server's sentence in `saveError` and its per-field messages in
 * `saveFieldErrors`.
 */
export function useSiteSettings(siteId: () => string) {
  const settings = useAsync(() => getSiteSettings(siteId()));
  const isSaving = ref(false);
  const saveError = ref<string | null>(null);
  const saveFieldErrors: Ref<Partial<Record<DraftField, string>>> = ref({});

  async function save(change: SettingsChange): Promise<SiteSettings | undefined> {
    const forSite = siteId();
    isSaving.value = true;
    saveError.value = null;
    saveFieldErrors.value = {};
    try {
      const saved = await updateSiteSettings(forSite, change);
      // A site switched while the change was on its way keeps the other site's settings out of view.
      if (forSite === siteId()) settings.data.value = saved;
      return saved;
    } catch (cause) {
      saveError.value = errorMessage(cause);
      if (cause instanceof ApiError && cause.status === 400) saveFieldErrors.value = fieldErrorsFrom(cause.details);
      return undefined;
    } finally {
      isSaving.value = false;
    }
  }

  /** Forgets the server's refusal of one field once the person edits it again. */
  function clearFieldError(field: DraftField): void {
    if (!(field in saveFieldErrors.value)) return;
    const { [field]: _gone, ...rest } = saveFieldErrors.value;
    saveFieldErrors.value = rest;
  }

  return { ...settings, save, isSaving, saveError, saveFieldErrors, clearFieldError };
}
