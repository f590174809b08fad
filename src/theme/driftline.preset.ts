import { definePreset } from '@primeuix/themes';
import Aura from '@primeuix/themes/aura';
import { palette } from './palette';

/*
 * Scales are hand-mixed around the palette's anchor colours (ink at 800, paper at 50, amber at
 * 500) so that hover and active states stay in the same family instead of Aura's defaults.
 */
const ink = {
  50: '#f1f3f7',
  100: '#dde2ea',
  200: '#bcc5d3',
  300: '#94a1b6',
  400: '#6b7a93',
  500: '#4c5b75',
  600: '#3a4860',
  700: '#2c3a51',
  800: palette.ink,
  900: '#172133',
  950: '#0e1522',
};

const paperSurface = {
  0: '#fffdf8',
  50: palette.paper,
  100: '#efebe0',
  200: '#e4e0d5',
  300: '#cfd3da',
  400: '#a3abb8',
  500: '#7a8494',
  600: '#5a6475',
  700: '#414b5c',
  800: '#2c3544',
  900: '#1e2533',
  950: '#131822',
};

/** Driftline's PrimeVue theme: Aura's structure with our ink, paper, slate and amber. */
export const DriftlinePreset = definePreset(Aura, {
  primitive: {
    borderRadius: { none: '0', xs: '2px', sm: '4px', md: '6px', lg: '8px', xl: '12px' },
  },
  semantic: {
    primary: ink,
    focusRing: { width: '2px', style: 'solid', color: palette.amber, offset: '2px' },
    colorScheme: {
      light: {
        surface: paperSurface,
        primary: {
          color: palette.ink,
          contrastColor: '#ffffff',
          hoverColor: '#2c3a51',
          activeColor: '#172133',
        },
        highlight: {
          background: '#fbeedc',
          focusBackground: '#f7e0bf',
          color: palette.ink,
          focusColor: palette.ink,
        },
        content: {
          background: '#fffdf8',
          hoverBackground: '#f3efe4',
          borderColor: palette.slate,
          color: palette.ink,
          hoverColor: palette.ink,
        },
        formField: {
          background: '#fffdf8',
          borderColor: '#b9c1ce',
          hoverBorderColor: '#6b7a93',
          focusBorderColor: palette.ink,
          color: palette.ink,
          placeholderColor: '#6b7485',
          floatLabelColor: '#4c5b75',
        },
        text: {
          color: palette.ink,
          hoverColor: '#0e1522',
          mutedColor: '#586274',
          hoverMutedColor: '#3a4860',
        },
        overlay: {
          modal: { background: '#fffdf8', borderColor: palette.slate, color: palette.ink },
          popover: { background: '#fffdf8', borderColor: palette.slate, color: palette.ink },
          select: { background: '#fffdf8', borderColor: palette.slate, color: palette.ink },
        },
        list: {
          option: { focusBackground: '#f3efe4', selectedBackground: '#fbeedc', selectedFocusBackground: '#f7e0bf' },
        },
      },
    },
  },
  components: {
    message: {
      colorScheme: {
        light: {
          warn: { background: '#fdf3e2', borderColor: '#efcf9c', color: '#6f3d03', shadow: 'none' },
          error: { background: '#fcf0ee', borderColor: '#ebc3be', color: '#8c2a23', shadow: 'none' },
          success: { background: '#eaf6f3', borderColor: '#a9d8cf', color: '#0f5f55', shadow: 'none' },
          info: { background: '#eef1f6', borderColor: '#c6cedb', color: '#1e2a3f', shadow: 'none' },
        },
      },
    },
    datatable: {
      colorScheme: {
        light: {
          header: { background: '#fffdf8' },
          headerCell: { background: '#f1ede2', color: palette.ink, selectedBackground: '#f1ede2', selectedColor: palette.ink },
          sortIcon: { color: '#586274', hoverColor: palette.ink },
          row: { background: '#fffdf8', stripedBackground: '#faf7f0' },
        },
      },
    },
    tabs: {
      colorScheme: {
        light: {
          tablist: { background: 'transparent' },
          tab: { activeBorderColor: palette.amber, activeColor: palette.ink, color: '#586274', hoverColor: palette.ink },
          activeBar: { background: palette.amber },
          tabpanel: { background: 'transparent' },
        },
      },
    },
  },
});
