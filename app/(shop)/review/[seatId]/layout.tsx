import { SeatPageGate } from "@/lib/pages/seat-page";

export default function SeatLayout({ children, params }: { children: React.ReactNode; params: Promise<{ seatId: string }> }) {
  return <SeatPageGate params={params}>{children}</SeatPageGate>;
}
