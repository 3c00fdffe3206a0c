-- serial_add: the VHDL twin of serial_add.v (one bit per cycle, LSB first, valid/ready
-- handshake; in_ready high when idle and in a sum's last cycle).
-- BUG = 1: a result is dropped when the next vector is accepted in the cycle the sum
-- completes (when ready falls again).
library ieee;
use ieee.std_logic_1164.all;

entity serial_add is
  generic (
    W   : positive := 8;
    BUG : natural := 0
  );
  port (
    clk       : in  std_logic;
    rst_n     : in  std_logic;
    in_valid  : in  std_logic;
    in_ready  : out std_logic;
    a         : in  std_logic_vector(W - 1 downto 0);
    b         : in  std_logic_vector(W - 1 downto 0);
    y         : out std_logic_vector(W - 1 downto 0);
    co        : out std_logic;
    out_valid : out std_logic
  );
end entity serial_add;

architecture rtl of serial_add is
  signal busy, c : std_logic := '0';
  signal ra, rb, acc : std_logic_vector(W - 1 downto 0) := (others => '0');
  signal n : natural range 0 to W := 0;
  signal last, ready, take, bit_sum, bit_carry : std_logic;
begin
  last <= '1' when busy = '1' and n = W - 1 else '0';
  ready <= (not busy) or last;
  in_ready <= ready;
  take <= in_valid and ready;
  bit_sum <= ra(0) xor rb(0) xor c;
  bit_carry <= (ra(0) and rb(0)) or (c and (ra(0) xor rb(0)));

  process (clk)
  begin
    if rising_edge(clk) then
      if rst_n = '0' then
        busy <= '0'; out_valid <= '0'; n <= 0; c <= '0';
        ra <= (others => '0'); rb <= (others => '0'); acc <= (others => '0');
        y <= (others => '0'); co <= '0';
      else
        out_valid <= '0';
        if busy = '1' then
          acc <= bit_sum & acc(W - 1 downto 1);
          c <= bit_carry;
          ra <= '0' & ra(W - 1 downto 1);
          rb <= '0' & rb(W - 1 downto 1);
          n <= n + 1;
          if last = '1' then
            busy <= '0';
            y <= bit_sum & acc(W - 1 downto 1);
            co <= bit_carry;
            if BUG = 1 and take = '1' then
              out_valid <= '0';
            else
              out_valid <= '1';
            end if;
          end if;
        end if;
        if take = '1' then
          ra <= a; rb <= b; c <= '0'; n <= 0; acc <= (others => '0');
          busy <= '1';
        end if;
      end if;
    end if;
  end process;
end architecture rtl;
