import { agentFor, signUp, startHarness } from '@/tests/server/harness';
import type { Harness } from '@/tests/server/harness';

let h: Harness;
beforeAll(async () => {
  h = await startHarness({ signInPerMinute: 3 });
  await signUp(h.app, { email: 'target@theta.example', password: 'real-password-1' });
});
afterAll(async () => {
  await h.close();
});

it('limits sign-in attempts per client and minute, and a forged client-address header does not reset the count', async () => {
  const statuses: number[] = [];
  for (let i = 0; i < 5; i++) {
    const res = await agentFor(h.app)
      .post('/api/auth/sign-in/email')
      .set('X-Quasilevel-Client-Ip', `10.0.0.${i}`)
      .set('X-Forwarded-For', `10.0.1.${i}`)
      .send({ email: 'target@theta.example', password: `guess-${i}-xxxx` });
    statuses.push(res.status);
  }
  expect(statuses.slice(0, 3)).toEqual([401, 401, 401]);
  expect(statuses.slice(3)).toEqual([429, 429]);
});
