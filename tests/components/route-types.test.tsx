/**
 * The typed-routes declaration is committed (.expo/types/router.d.ts) so that tsc checks every href
 * on a fresh clone; it must describe the routes app/ has now.
 */
import { committedRouteTypes, routeTypes } from '@/scripts/route-types';

describe('typed routes', () => {
  it('the committed .expo/types/router.d.ts matches the routes in app/ (regenerate: npx tsx scripts/route-types.ts)', () => {
    const generated = routeTypes();
    // A route the app has, and one it has not, so a generator that produced nothing useful fails too.
    expect(generated).toContain('/compare');
    expect(generated).toContain('/curves/${Router.SingleRoutePart<T>}');
    expect(generated).not.toContain('/physics/');
    expect(committedRouteTypes()).toBe(generated);
  });
});
