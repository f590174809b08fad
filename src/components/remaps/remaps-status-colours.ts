import type { RemapStatus } from '@/api/remaps.api';

/**
 * Calendar colours of request statuses: a light fill with a strong edge, from the app's palette
 * (ink for planned work, amber while under way, teal verified, red not fixed, slate for what is
 * not happening yet or any more).
 */
export const remapStatusColours: Record<RemapStatus, { fill: string; edge: string; text: string }> = {
  proposed: { fill: '#eef0f4', edge: '#94a1b6', text: '#3a4860' },
  scheduled: { fill: '#dde2ea', edge: '#1e2a3f', text: '#1e2a3f' },
  in_progress: { fill: '#fbeedc', edge: '#e38b1b', text: '#6b3d04' },
  map_uploaded: { fill: '#e4e8f0', edge: '#3a4860', text: '#1e2a3f' },
  verified: { fill: '#e2f3f0', edge: '#1c9a8a', text: '#0f5f55' },
  not_fixed: { fill: '#fcf0ee', edge: '#a4332b', text: '#8c2a23' },
  cancelled: { fill: '#f2f1ed', edge: '#b9c1ce', text: '#586274' },
};
