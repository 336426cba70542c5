import type { OutboxMessageDto } from '../contracts/mail';
import type { DataSource, Repository } from 'typeorm';
import { AppError } from '../common/app-error';
import { OutboxMessage } from './mail.entity';

export type { OutboxMessageDto } from '../contracts/mail';

function toDto(m: OutboxMessage): OutboxMessageDto {
  return {
    id: m.id,
    from: m.from,
    to: m.to,
    subject: m.subject,
    text: m.text,
    html: m.html,
    rawSize: m.rawSize,
    receivedAt: m.receivedAt,
  };
}

/** What the local SMTP stand-in received, newest first. */
export class OutboxService {
  private readonly messages: Repository<OutboxMessage>;

  constructor(dataSource: DataSource) {
    this.messages = dataSource.getRepository(OutboxMessage);
  }

  async list(page: number, pageSize: number): Promise<{ items: OutboxMessageDto[]; total: number }> {
    const [rows, total] = await this.messages.findAndCount({
      order: { id: 'DESC' },
      skip: page * pageSize,
      take: pageSize,
    });
    return { items: rows.map(toDto), total };
  }

  async get(id: number): Promise<OutboxMessageDto> {
    const row = await this.messages.findOneBy({ id });
    if (!row) throw AppError.notFound(`No message with id ${id} in the outbox.`);
    return toDto(row);
  }
}
