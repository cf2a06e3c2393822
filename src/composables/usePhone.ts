import { onScopeDispose, ref, type Ref } from 'vue';

/** The widest screen, in CSS pixels, that the pages lay out for a phone (a 390 px handset and up to 600). */
export const PHONE_MAX_WIDTH = 600;

/**
 * True while the screen is phone-sized, following rotation and resizing. Without a window (the
 * server renderer, tests) it is false: the wide layout.
 *
 * @example
 * const isPhone = usePhone()
 * const columns = computed(() => (isPhone.value ? phoneColumns : wideColumns))
 */
export function usePhone(maxWidth = PHONE_MAX_WIDTH): Ref<boolean> {
  const isPhone = ref(false);
  if (typeof window === 'undefined' || typeof window.matchMedia !== 'function') return isPhone;
  const query = window.matchMedia(`(max-width: ${maxWidth}px)`);
  isPhone.value = query.matches;
  const onChange = (e: MediaQueryListEvent) => {
    isPhone.value = e.matches;
  };
  query.addEventListener('change', onChange);
  onScopeDispose(() => query.removeEventListener('change', onChange));
  return isPhone;
}
