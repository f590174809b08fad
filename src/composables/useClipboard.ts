import { ref } from 'vue';

/** Copies text to the clipboard; `copied` is true for a few seconds after a successful copy. */
export function useClipboard(resetAfterMs = 2500) {
  const copied = ref(false);
  const failed = ref(false);
  let timer: ReturnType<typeof setTimeout> | undefined;

  function fallbackCopy(text: string): boolean {
    // Browsers refuse the async clipboard API without permission or outside secure contexts; a selected textarea still works there.
    const area = document.createElement('textarea');
    area.value = text;
    area.setAttribute('readonly', '');
    area.style.position = 'fixed';
    area.style.opacity = '0';
    document.body.appendChild(area);
    area.select();
    let ok = false;
    try {
      ok = document.execCommand('copy');
    } finally {
      area.remove();
    }
    return ok;
  }

  async function copy(text: string): Promise<boolean> {
    let ok = false;
    try {
      await navigator.clipboard.writeText(text);
      ok = true;
    } catch {
      ok = fallbackCopy(text);
    }
    copied.value = ok;
    failed.value = !ok;
    clearTimeout(timer);
    timer = setTimeout(() => {
      copied.value = false;
      failed.value = false;
    }, resetAfterMs);
    return ok;
  }

  return { copy, copied, failed };
}
