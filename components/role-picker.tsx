import { Pressable, StyleSheet, View } from 'react-native';
import { theme } from '@/components/theme';
import { Txt } from '@/components/txt';
import { ROLE_LABELS, ROLES } from '@/lib/auth/roles';
import type { Role } from '@/lib/auth/roles';

/** The four roles as a row of chips (a radio group); `testID` prefixes each chip's id with the role. */
export function RolePicker({ value, onChange, label, disabled, testID }: { value: Role | null; onChange: (r: Role) => void; label: string; disabled?: boolean; testID?: string }) {
  return (
    <View style={styles.roles} accessibilityRole="radiogroup" accessibilityLabel={label}>
      {ROLES.map((r) => {
        const active = value === r;
        return (
          <Pressable
            key={r}
            accessibilityRole="radio"
            aria-checked={active}
            disabled={active || disabled}
            onPress={() => onChange(r)}
            style={[styles.role, active && styles.roleActive, disabled && !active && { opacity: 0.6 }]}
            testID={testID ? `${testID}-${r}` : undefined}
          >
            <Txt variant="caption" style={{ color: active ? '#fff' : theme.color.inkSoft }}>
              {ROLE_LABELS[r]}
            </Txt>
          </Pressable>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  roles: { flexDirection: 'row', flexWrap: 'wrap', gap: 6 },
  role: { paddingHorizontal: 10, paddingVertical: 5, borderRadius: 999, borderWidth: 1, borderColor: theme.color.line },
  roleActive: { backgroundColor: theme.color.ink, borderColor: theme.color.ink },
});
