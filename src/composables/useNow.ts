import { onBeforeUnmount, onMounted, ref, type Ref } from 'vue';

/** Returns the current time as a ref that ticks every `intervalMs` milliseconds while the component lives. */
export function useNow(intervalMs = 30_000): Ref<Date> {
  const now = ref(new Date());
  let timer: ReturnType<typeof setInterval> | undefined;
  onMounted(() => {
    timer = setInterval(() => {
      now.value = new Date();
    }, intervalMs);
  });
  onBeforeUnmount(() => clearInterval(timer));
  return now;
}
