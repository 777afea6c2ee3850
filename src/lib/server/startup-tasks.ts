// Start-up tasks, registered in the order they run. Add a line here for a new one.
import { onStartup } from '$lib/server/startup';
import { seedDemo } from '$lib/server/demo/seed';

onStartup('demo seed', async () => {
	if (process.env.TIDEMARK_DEMO === '1') await seedDemo();
});
