import type { Config } from 'tailwindcss'
import colors from 'tailwindcss/colors'
import defaultTheme from 'tailwindcss/defaultTheme'

// Greybody design tokens. Severity colours are stops of the open inferno colour map; they carry meaning
// (band 1 = most severe), so the app's chrome uses the stone/graphite neutrals and never these hues.
export default {
  content: [
    './components/**/*.{vue,ts}',
    './layouts/**/*.vue',
    './pages/**/*.vue',
    './composables/**/*.ts',
    './app.vue',
    './error.vue',
    './shared/navigation.ts',
  ],
  theme: {
    extend: {
      colors: {
        band: {
          1: '#A52C60',
          2: '#E35933',
          3: '#FB9B06',
          4: '#F6D746',
        },
        // Text to put on each band colour so it passes WCAG AA (white only reads on band 1).
        'band-ink': {
          1: '#ffffff',
          2: '#1c1917',
          3: '#1c1917',
          4: '#1c1917',
        },
        clear: colors.slate,
        graphite: {
          DEFAULT: '#1c1917',
          soft: '#292524',
          line: '#44403c',
        },
      },
      fontFamily: {
        sans: ['Manrope', ...defaultTheme.fontFamily.sans],
      },
      minHeight: {
        touch: '2.75rem',
      },
      minWidth: {
        touch: '2.75rem',
      },
      maxWidth: {
        prose: '68ch',
      },
    },
  },
  plugins: [],
} satisfies Config
