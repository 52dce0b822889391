-- CreateTable
CREATE TABLE "Organisation" (
    "id" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "emergencyPhone" TEXT,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Organisation_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Site" (
    "id" TEXT NOT NULL,
    "organisationId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "kind" TEXT NOT NULL,
    "address" TEXT NOT NULL DEFAULT '',
    "jurisdiction" TEXT NOT NULL DEFAULT 'US',
    "rulebookId" TEXT NOT NULL DEFAULT 'us-federal',
    "regulatoryIds" TEXT NOT NULL DEFAULT '',
    "unitSystem" TEXT NOT NULL DEFAULT 'kg',
    "isConsumerExempt" BOOLEAN NOT NULL DEFAULT false,
    "depositRuleId" TEXT,
    "unitCount" INTEGER NOT NULL DEFAULT 0,
    "batteryKg" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "leadKg" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "electrolyteKg" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "acidKg" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "peakYear" INTEGER NOT NULL DEFAULT 0,
    "peakBatteryKg" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "depositBalanceCents" INTEGER NOT NULL DEFAULT 0,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Site_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Bay" (
    "id" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "unitCount" INTEGER NOT NULL DEFAULT 0,
    "batteryKg" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "leadKg" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "electrolyteKg" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "acidKg" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Bay_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Container" (
    "id" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "bayId" TEXT,
    "labelNumber" TEXT NOT NULL,
    "kind" TEXT NOT NULL,
    "isClosed" BOOLEAN NOT NULL DEFAULT false,
    "state" TEXT NOT NULL DEFAULT 'open',
    "accumulationStart" TIMESTAMP(3),
    "sealedAt" TIMESTAMP(3),
    "loadId" TEXT,
    "unitCount" INTEGER NOT NULL DEFAULT 0,
    "batteryKg" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "leadKg" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "electrolyteKg" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "acidKg" DOUBLE PRECISION NOT NULL DEFAULT 0,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Container_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Unit" (
    "id" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "containerId" TEXT,
    "kind" TEXT NOT NULL,
    "nominalVoltage" INTEGER NOT NULL,
    "capacityAh" DOUBLE PRECISION,
    "cca" INTEGER,
    "groupSize" TEXT,
    "weightKg" DOUBLE PRECISION,
    "condition" TEXT NOT NULL,
    "source" TEXT NOT NULL,
    "state" TEXT NOT NULL DEFAULT 'received',
    "saleRef" TEXT,
    "note" TEXT,
    "receivedAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "receivedBy" TEXT NOT NULL,
    "method" TEXT NOT NULL,
    "batteryKg" DOUBLE PRECISION NOT NULL,
    "batteryKgLow" DOUBLE PRECISION NOT NULL,
    "batteryKgHigh" DOUBLE PRECISION NOT NULL,
    "leadKg" DOUBLE PRECISION NOT NULL,
    "leadKgLow" DOUBLE PRECISION NOT NULL,
    "leadKgHigh" DOUBLE PRECISION NOT NULL,
    "electrolyteKg" DOUBLE PRECISION NOT NULL,
    "electrolyteKgLow" DOUBLE PRECISION NOT NULL,
    "electrolyteKgHigh" DOUBLE PRECISION NOT NULL,
    "acidKg" DOUBLE PRECISION NOT NULL,
    "acidKgLow" DOUBLE PRECISION NOT NULL,
    "acidKgHigh" DOUBLE PRECISION NOT NULL,
    "polymerKg" DOUBLE PRECISION NOT NULL,
    "otherKg" DOUBLE PRECISION NOT NULL,

    CONSTRAINT "Unit_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Lot" (
    "id" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "containerId" TEXT,
    "ticketNumber" TEXT NOT NULL,
    "grossKg" DOUBLE PRECISION NOT NULL,
    "tareKg" DOUBLE PRECISION NOT NULL,
    "netKg" DOUBLE PRECISION NOT NULL,
    "unitCount" INTEGER NOT NULL,
    "mix" TEXT NOT NULL,
    "state" TEXT NOT NULL DEFAULT 'received',
    "receivedAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "receivedBy" TEXT NOT NULL,
    "leadKg" DOUBLE PRECISION NOT NULL,
    "leadKgLow" DOUBLE PRECISION NOT NULL,
    "leadKgHigh" DOUBLE PRECISION NOT NULL,
    "electrolyteKg" DOUBLE PRECISION NOT NULL,
    "electrolyteKgLow" DOUBLE PRECISION NOT NULL,
    "electrolyteKgHigh" DOUBLE PRECISION NOT NULL,
    "acidKg" DOUBLE PRECISION NOT NULL,
    "acidKgLow" DOUBLE PRECISION NOT NULL,
    "acidKgHigh" DOUBLE PRECISION NOT NULL,

    CONSTRAINT "Lot_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "LevelChange" (
    "id" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "at" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "reason" TEXT NOT NULL,
    "refId" TEXT,
    "unitCount" INTEGER NOT NULL,
    "batteryKg" DOUBLE PRECISION NOT NULL,
    "leadKg" DOUBLE PRECISION NOT NULL,
    "electrolyteKg" DOUBLE PRECISION NOT NULL,
    "acidKg" DOUBLE PRECISION NOT NULL,

    CONSTRAINT "LevelChange_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "CustomRule" (
    "id" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "title" TEXT NOT NULL,
    "metric" TEXT NOT NULL,
    "threshold" DOUBLE PRECISION NOT NULL,
    "unit" TEXT NOT NULL,
    "warningPct" DOUBLE PRECISION NOT NULL DEFAULT 80,
    "citation" TEXT NOT NULL,
    "caution" TEXT NOT NULL DEFAULT '',
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "CustomRule_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Facility" (
    "id" TEXT NOT NULL,
    "organisationId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "address" TEXT NOT NULL,
    "regulatoryIds" TEXT NOT NULL DEFAULT '',
    "tolerancePct" DOUBLE PRECISION NOT NULL DEFAULT 2,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Facility_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Carrier" (
    "id" TEXT NOT NULL,
    "organisationId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "address" TEXT NOT NULL DEFAULT '',
    "regulatoryIds" TEXT NOT NULL DEFAULT '',
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Carrier_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Load" (
    "id" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "facilityId" TEXT NOT NULL,
    "carrierId" TEXT,
    "reference" TEXT NOT NULL,
    "vehicle" TEXT NOT NULL DEFAULT '',
    "state" TEXT NOT NULL DEFAULT 'planning',
    "basis" TEXT,
    "checklist" TEXT NOT NULL DEFAULT '{}',
    "departureScaleKg" DOUBLE PRECISION,
    "departedAt" TIMESTAMP(3),
    "receivedKg" DOUBLE PRECISION,
    "receivedAt" TIMESTAMP(3),
    "reconciledAt" TIMESTAMP(3),
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Load_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Document" (
    "id" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "loadId" TEXT,
    "kind" TEXT NOT NULL,
    "rulebookId" TEXT NOT NULL,
    "rulebookVersion" TEXT NOT NULL,
    "input" TEXT NOT NULL,
    "sha256" TEXT NOT NULL,
    "issuedAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "issuedBy" TEXT NOT NULL,

    CONSTRAINT "Document_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Sale" (
    "id" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "saleRef" TEXT NOT NULL,
    "soldAt" TIMESTAMP(3) NOT NULL,
    "product" TEXT NOT NULL,
    "groupSize" TEXT NOT NULL DEFAULT '',
    "quantity" INTEGER NOT NULL,
    "depositCents" INTEGER NOT NULL,
    "importId" TEXT,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "Sale_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "DepositEntry" (
    "id" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "kind" TEXT NOT NULL,
    "amountCents" INTEGER NOT NULL,
    "saleRef" TEXT NOT NULL,
    "unitId" TEXT,
    "at" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "createdBy" TEXT NOT NULL,

    CONSTRAINT "DepositEntry_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "TrailEvent" (
    "id" TEXT NOT NULL,
    "organisationId" TEXT NOT NULL,
    "siteId" TEXT,
    "at" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "actor" TEXT NOT NULL,
    "actorLabel" TEXT NOT NULL,
    "action" TEXT NOT NULL,
    "entity" TEXT NOT NULL,
    "entityId" TEXT NOT NULL,
    "before" TEXT,
    "after" TEXT,

    CONSTRAINT "TrailEvent_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "IdempotencyKey" (
    "id" TEXT NOT NULL,
    "scope" TEXT NOT NULL,
    "key" TEXT NOT NULL,
    "status" INTEGER NOT NULL,
    "body" TEXT NOT NULL,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,

    CONSTRAINT "IdempotencyKey_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "Membership" (
    "id" TEXT NOT NULL,
    "userId" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "role" TEXT NOT NULL,

    CONSTRAINT "Membership_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "ApiKey" (
    "id" TEXT NOT NULL,
    "organisationId" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "role" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "prefix" TEXT NOT NULL,
    "hash" TEXT NOT NULL,
    "createdBy" TEXT NOT NULL,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "lastUsedAt" TIMESTAMP(3),
    "revokedAt" TIMESTAMP(3),

    CONSTRAINT "ApiKey_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "user" (
    "id" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "email" TEXT NOT NULL,
    "emailVerified" BOOLEAN NOT NULL DEFAULT false,
    "image" TEXT,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "updatedAt" TIMESTAMP(3) NOT NULL,
    "organisationId" TEXT,

    CONSTRAINT "user_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "session" (
    "id" TEXT NOT NULL,
    "expiresAt" TIMESTAMP(3) NOT NULL,
    "token" TEXT NOT NULL,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "updatedAt" TIMESTAMP(3) NOT NULL,
    "ipAddress" TEXT,
    "userAgent" TEXT,
    "userId" TEXT NOT NULL,

    CONSTRAINT "session_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "account" (
    "id" TEXT NOT NULL,
    "accountId" TEXT NOT NULL,
    "providerId" TEXT NOT NULL,
    "userId" TEXT NOT NULL,
    "accessToken" TEXT,
    "refreshToken" TEXT,
    "idToken" TEXT,
    "accessTokenExpiresAt" TIMESTAMP(3),
    "refreshTokenExpiresAt" TIMESTAMP(3),
    "scope" TEXT,
    "password" TEXT,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "updatedAt" TIMESTAMP(3) NOT NULL,

    CONSTRAINT "account_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "verification" (
    "id" TEXT NOT NULL,
    "identifier" TEXT NOT NULL,
    "value" TEXT NOT NULL,
    "expiresAt" TIMESTAMP(3) NOT NULL,
    "createdAt" TIMESTAMP(3) NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "updatedAt" TIMESTAMP(3) NOT NULL,

    CONSTRAINT "verification_pkey" PRIMARY KEY ("id")
);

-- CreateTable
CREATE TABLE "rateLimit" (
    "id" TEXT NOT NULL,
    "key" TEXT NOT NULL,
    "count" INTEGER NOT NULL,
    "lastRequest" BIGINT NOT NULL,

    CONSTRAINT "rateLimit_pkey" PRIMARY KEY ("id")
);

-- CreateIndex
CREATE INDEX "Site_organisationId_idx" ON "Site"("organisationId");

-- CreateIndex
CREATE UNIQUE INDEX "Bay_siteId_name_key" ON "Bay"("siteId", "name");

-- CreateIndex
CREATE INDEX "Container_siteId_state_idx" ON "Container"("siteId", "state");

-- CreateIndex
CREATE INDEX "Container_loadId_idx" ON "Container"("loadId");

-- CreateIndex
CREATE UNIQUE INDEX "Container_siteId_labelNumber_key" ON "Container"("siteId", "labelNumber");

-- CreateIndex
CREATE INDEX "Unit_siteId_receivedAt_idx" ON "Unit"("siteId", "receivedAt");

-- CreateIndex
CREATE INDEX "Unit_containerId_idx" ON "Unit"("containerId");

-- CreateIndex
CREATE INDEX "Unit_siteId_state_idx" ON "Unit"("siteId", "state");

-- CreateIndex
CREATE INDEX "Lot_containerId_idx" ON "Lot"("containerId");

-- CreateIndex
CREATE UNIQUE INDEX "Lot_siteId_ticketNumber_key" ON "Lot"("siteId", "ticketNumber");

-- CreateIndex
CREATE INDEX "LevelChange_siteId_at_idx" ON "LevelChange"("siteId", "at");

-- CreateIndex
CREATE INDEX "Load_siteId_state_idx" ON "Load"("siteId", "state");

-- CreateIndex
CREATE UNIQUE INDEX "Load_siteId_reference_key" ON "Load"("siteId", "reference");

-- CreateIndex
CREATE INDEX "Document_siteId_kind_idx" ON "Document"("siteId", "kind");

-- CreateIndex
CREATE INDEX "Document_loadId_idx" ON "Document"("loadId");

-- CreateIndex
CREATE INDEX "Sale_siteId_soldAt_idx" ON "Sale"("siteId", "soldAt");

-- CreateIndex
CREATE UNIQUE INDEX "Sale_siteId_saleRef_key" ON "Sale"("siteId", "saleRef");

-- CreateIndex
CREATE INDEX "DepositEntry_siteId_at_idx" ON "DepositEntry"("siteId", "at");

-- CreateIndex
CREATE INDEX "DepositEntry_siteId_saleRef_idx" ON "DepositEntry"("siteId", "saleRef");

-- CreateIndex
CREATE INDEX "TrailEvent_organisationId_at_idx" ON "TrailEvent"("organisationId", "at");

-- CreateIndex
CREATE INDEX "TrailEvent_siteId_at_idx" ON "TrailEvent"("siteId", "at");

-- CreateIndex
CREATE INDEX "TrailEvent_entity_entityId_idx" ON "TrailEvent"("entity", "entityId");

-- CreateIndex
CREATE UNIQUE INDEX "IdempotencyKey_scope_key_key" ON "IdempotencyKey"("scope", "key");

-- CreateIndex
CREATE UNIQUE INDEX "Membership_userId_siteId_key" ON "Membership"("userId", "siteId");

-- CreateIndex
CREATE UNIQUE INDEX "ApiKey_hash_key" ON "ApiKey"("hash");

-- CreateIndex
CREATE UNIQUE INDEX "user_email_key" ON "user"("email");

-- CreateIndex
CREATE UNIQUE INDEX "session_token_key" ON "session"("token");

-- CreateIndex
CREATE INDEX "session_userId_idx" ON "session"("userId");

-- CreateIndex
CREATE INDEX "account_userId_idx" ON "account"("userId");

-- CreateIndex
CREATE INDEX "verification_identifier_idx" ON "verification"("identifier");

-- CreateIndex
CREATE UNIQUE INDEX "rateLimit_key_key" ON "rateLimit"("key");

-- AddForeignKey
ALTER TABLE "Site" ADD CONSTRAINT "Site_organisationId_fkey" FOREIGN KEY ("organisationId") REFERENCES "Organisation"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Bay" ADD CONSTRAINT "Bay_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Container" ADD CONSTRAINT "Container_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Container" ADD CONSTRAINT "Container_bayId_fkey" FOREIGN KEY ("bayId") REFERENCES "Bay"("id") ON DELETE SET NULL ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Container" ADD CONSTRAINT "Container_loadId_fkey" FOREIGN KEY ("loadId") REFERENCES "Load"("id") ON DELETE SET NULL ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Unit" ADD CONSTRAINT "Unit_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Unit" ADD CONSTRAINT "Unit_containerId_fkey" FOREIGN KEY ("containerId") REFERENCES "Container"("id") ON DELETE SET NULL ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Lot" ADD CONSTRAINT "Lot_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Lot" ADD CONSTRAINT "Lot_containerId_fkey" FOREIGN KEY ("containerId") REFERENCES "Container"("id") ON DELETE SET NULL ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "LevelChange" ADD CONSTRAINT "LevelChange_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "CustomRule" ADD CONSTRAINT "CustomRule_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Facility" ADD CONSTRAINT "Facility_organisationId_fkey" FOREIGN KEY ("organisationId") REFERENCES "Organisation"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Carrier" ADD CONSTRAINT "Carrier_organisationId_fkey" FOREIGN KEY ("organisationId") REFERENCES "Organisation"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Load" ADD CONSTRAINT "Load_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Load" ADD CONSTRAINT "Load_facilityId_fkey" FOREIGN KEY ("facilityId") REFERENCES "Facility"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Load" ADD CONSTRAINT "Load_carrierId_fkey" FOREIGN KEY ("carrierId") REFERENCES "Carrier"("id") ON DELETE SET NULL ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Document" ADD CONSTRAINT "Document_loadId_fkey" FOREIGN KEY ("loadId") REFERENCES "Load"("id") ON DELETE SET NULL ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Sale" ADD CONSTRAINT "Sale_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "DepositEntry" ADD CONSTRAINT "DepositEntry_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Membership" ADD CONSTRAINT "Membership_userId_fkey" FOREIGN KEY ("userId") REFERENCES "user"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "Membership" ADD CONSTRAINT "Membership_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "ApiKey" ADD CONSTRAINT "ApiKey_organisationId_fkey" FOREIGN KEY ("organisationId") REFERENCES "Organisation"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "ApiKey" ADD CONSTRAINT "ApiKey_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site"("id") ON DELETE RESTRICT ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "user" ADD CONSTRAINT "user_organisationId_fkey" FOREIGN KEY ("organisationId") REFERENCES "Organisation"("id") ON DELETE SET NULL ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "session" ADD CONSTRAINT "session_userId_fkey" FOREIGN KEY ("userId") REFERENCES "user"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- AddForeignKey
ALTER TABLE "account" ADD CONSTRAINT "account_userId_fkey" FOREIGN KEY ("userId") REFERENCES "user"("id") ON DELETE CASCADE ON UPDATE CASCADE;

-- Hand-written (not in the Prisma model): trail events are append-only. The database itself
-- refuses to change, remove or truncate one, whatever the code above it does.
CREATE FUNCTION "trail_event_refuse_change"() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
    RAISE EXCEPTION 'trail events are append-only' USING HINT = TG_OP || ' on "TrailEvent" is refused';
END;
$$;

CREATE TRIGGER "TrailEvent_refuse_update_delete" BEFORE UPDATE OR DELETE ON "TrailEvent"
    FOR EACH ROW EXECUTE FUNCTION "trail_event_refuse_change"();

CREATE TRIGGER "TrailEvent_refuse_truncate" BEFORE TRUNCATE ON "TrailEvent"
    FOR EACH STATEMENT EXECUTE FUNCTION "trail_event_refuse_change"();
