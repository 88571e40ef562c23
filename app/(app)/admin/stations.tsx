import { Screen } from '@/components/screen';
import { StationsPanel } from '@/components/stations-panel';

/** Administrators: the test stations' keys (made, last used, revoked). */
export default function StationsScreen() {
  return (
    <Screen title="Test stations" subtitle="Keys that let a test station’s folder watcher send its files. A key can only create batches and upload curves." testID="stations-screen">
      <StationsPanel />
    </Screen>
  );
}
