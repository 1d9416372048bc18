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
});
