import type { Config } from 'tailwindcss'
import defaultTheme from 'tailwindcss/defaultTheme'

// Halocline's palette follows its name: the sharp layer where fresh surface water meets
// salt water. Deep "ink" blues for structure, a "salt" ground, a "tide" teal for actions and a
// restrained "halogen" yellow-green (the colour of chlorine gas) for accents only.
// Text pairs are chosen for WCAG AA: the *-700 shades on their *-50 grounds are all above 6:1.
export default {
  theme: {
    extend: {
      colors: {
        ink: {
          50: '#F0F4F8', 100: '#DDE6EE', 200: '#BCCDDC', 300: '#93B2CA', 400: '#6A8FAD',
          500: '#4A7192', 600: '#3A5671', 700: '#2B4560', 800: '#1C334A', 900: '#10263D', 950: '#0B1A2B',
        },
        salt: {
          50: '#FBFAF7', 100: '#F4F2EC', 200: '#E8E4DA', 300: '#D6D0C2', 400: '#B5AD9B',
        },
        tide: {
          50: '#EEF8F6', 100: '#D2EEE9', 200: '#A6DDD4', 300: '#6FC3B7', 400: '#39A396',
          500: '#1E887C', 600: '#147268', 700: '#0F5F57', 800: '#0D4C46', 900: '#0B3C38',
        },
        halogen: {
          50: '#F8FBE3', 100: '#F1F7C4', 200: '#E4F08E', 300: '#D4E65A', 400: '#BCD22F',
          500: '#9DB41C', 600: '#788A14', 700: '#5A6812', 800: '#475213', 900: '#3A4414',
        },
        ok: { 50: '#EBF6EE', 200: '#B4DEC0', 500: '#2E9A55', 600: '#1F7F43', 700: '#17643A', 800: '#124D2D' },
        warning: { 50: '#FFF5E0', 200: '#F6D58F', 500: '#D18B0C', 600: '#A86A00', 700: '#8A4B00', 800: '#6B3A00' },
        danger: { 50: '#FDEDEC', 200: '#F4BDB8', 500: '#D9443A', 600: '#C0352C', 700: '#9E241D', 800: '#7C1C17' },
        info: { 50: '#EAF2FB', 200: '#B9D3EE', 500: '#3B82C4', 600: '#2467A8', 700: '#1B5A91', 800: '#15466F' },
        // Chemical safety notices get their own tone so they never read as an ordinary warning.
        caution: { 50: '#FFF0E5', 200: '#F8C39D', 500: '#E06A1B', 600: '#C2530F', 700: '#9A3412', 800: '#7A2A0F' },
      },
      fontFamily: {
        sans: ['"IBM Plex Sans"', ...defaultTheme.fontFamily.sans],
        mono: ['"IBM Plex Mono"', ...defaultTheme.fontFamily.mono],
      },
      boxShadow: {
        card: '0 1px 2px rgb(11 26 43 / 0.06), 0 1px 3px rgb(11 26 43 / 0.08)',
        pop: '0 8px 24px rgb(11 26 43 / 0.16), 0 2px 6px rgb(11 26 43 / 0.10)',
      },
      maxWidth: { shell: '96rem' },
    },
  },
} satisfies Partial<Config>
