import { definePreset } from '@primeuix/themes';
import Aura from '@primeuix/themes/aura';
import { BRAND, deriveScale, deriveSurface } from './palette';

const primary = deriveScale(BRAND.fieldTeal, '#ffffff', '#04211f');
const surface = deriveSurface();

/**
 * Arcwright's PrimeVue preset: Aura's component structure, field teal as primary, chalk and ink as the neutrals.
 * Light scheme only; amber and red stay reserved for cautions (PrimeVue's warn/danger severities).
 */
export const ArcwrightPreset = definePreset(Aura, {
  semantic: {
    primary,
    focusRing: { width: '2px', style: 'solid', color: '{primary.400}', offset: '2px' },
    colorScheme: {
      light: {
        surface,
        primary: {
          color: '{primary.600}',
          contrastColor: '#ffffff',
          hoverColor: '{primary.700}',
          activeColor: '{primary.800}',
        },
        highlight: {
          background: '{primary.50}',
          focusBackground: '{primary.100}',
          color: '{primary.800}',
          focusColor: '{primary.900}',
        },
        formField: {
          color: '{surface.800}',
          // Placeholders are text: surface.600 keeps 4.5:1 on white and on chalk (Aura's 500 gives 3.8:1).
          placeholderColor: '{surface.600}',
          floatLabelFocusColor: '{primary.700}',
        },
        text: {
          color: BRAND.ink,
          hoverColor: '{surface.900}',
          mutedColor: '{surface.600}',
          hoverMutedColor: '{surface.700}',
        },
      },
    },
  },
  // Text colours Aura draws lighter than WCAG 2.1 AA allows (4.5:1 for text): secondary and text buttons, toggle
  // buttons, and the messages' and toasts' text on their pale tints (the caution on yellow was 2.8:1). Checked in
  // tests/client/palette.test.ts and by axe in tests/e2e/screens.test.ts.
  components: {
    button: {
      colorScheme: {
        light: {
          root: { secondary: { color: '{surface.700}', hoverColor: '{surface.800}', activeColor: '{surface.900}' } },
          outlined: { secondary: { color: '{surface.700}' }, danger: { color: '{red.700}' }, warn: { color: '{orange.800}' } },
          text: { secondary: { color: '{surface.700}' }, danger: { color: '{red.700}' }, warn: { color: '{orange.800}' } },
        },
      },
    },
    togglebutton: {
      colorScheme: {
        light: {
          root: { color: '{surface.700}', hoverColor: '{surface.800}' },
          icon: { color: '{surface.700}', hoverColor: '{surface.800}' },
        },
      },
    },
    message: {
      colorScheme: {
        light: {
          info: { color: '{blue.800}', outlined: { color: '{blue.800}' }, simple: { color: '{blue.800}' } },
          success: { color: '{green.800}', outlined: { color: '{green.800}' }, simple: { color: '{green.800}' } },
          warn: { color: '{yellow.800}', outlined: { color: '{yellow.800}' }, simple: { color: '{yellow.800}' } },
          error: { color: '{red.800}', outlined: { color: '{red.800}' }, simple: { color: '{red.800}' } },
          secondary: { color: '{surface.700}', outlined: { color: '{surface.700}' }, simple: { color: '{surface.700}' } },
        },
      },
    },
    // The toasts' summaries on their pale tints (Aura's 600 shades: green 3.1:1).
    toast: {
      colorScheme: {
        light: {
          info: { color: '{blue.800}' },
          success: { color: '{green.800}' },
          warn: { color: '{yellow.800}' },
          error: { color: '{red.800}' },
          secondary: { color: '{surface.700}' },
        },
      },
    },
  },
});
