import { ref } from 'vue';
import { defineStore } from 'pinia';
import { getSite } from '@/api/sites.api';
import type { Site } from '@/api/types';
import { ApiError, errorMessage } from '@/api/client';

/** The site the user is looking at, shared by the site header and the site's tabs. */
export const useSiteStore = defineStore('site', () => {
  const site = ref<Site | null>(null);
  const isLoading = ref(false);
  const error = ref<string | null>(null);
  const errorStatus = ref<number | null>(null);
  let latest = 0;

  /** Loads a site unless it is already the current one; a newer call wins over an older one. */
  async function load(siteId: string, options: { force?: boolean } = {}): Promise<void> {
    if (!options.force && site.value?.id === siteId && error.value === null) return;
    const ticket = ++latest;
    isLoading.value = true;
    error.value = null;
    errorStatus.value = null;
    if (site.value?.id !== siteId) site.value = null;
    try {
      const loaded = await getSite(siteId);
      if (ticket === latest) site.value = loaded;
    } catch (cause) {
      if (ticket !== latest) return;
      error.value = errorMessage(cause);
      errorStatus.value = cause instanceof ApiError ? cause.status : null;
    } finally {
      if (ticket === latest) isLoading.value = false;
    }
  }

  function clear(): void {
    latest++;
    site.value = null;
    error.value = null;
    errorStatus.value = null;
    isLoading.value = false;
  }

  return { site, isLoading, error, errorStatus, load, clear };
});
