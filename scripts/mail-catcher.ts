// The local fake mail server `npm start` runs beside Railcall: it keeps every message as a file
// under the data folder (nothing leaves the machine). Usage: mail-catcher.ts <port> <folder>
import { startFakeSmtp } from '../server/features/mail/fake-smtp';

const [port, dir] = process.argv.slice(2);
const smtp = await startFakeSmtp({ dir, port: Number(port) });
console.log(`[mail] local mail catcher on 127.0.0.1:${smtp.port}, messages kept in ${dir}`);
const stop = () => void smtp.close().then(() => process.exit(0));
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
