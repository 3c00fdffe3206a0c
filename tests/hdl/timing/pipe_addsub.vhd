-- pipe_addsub: the VHDL twin of pipe_addsub.v (three register stages, mode 0 = a + b,
-- mode 1 = a - b, co the raw adder carry, synchronous active-low reset).
-- BUG = 1: the sum stage uses the previous vector's mode.
-- BUG = 2: reset leaves the co register unassigned ('U' until the first result).
library ieee;
use ieee.std_logic_1164.all;
use ieee.numeric_std.all;

entity pipe_addsub is
  generic (
    W   : positive := 8;
    BUG : natural := 0
  );
  port (
    clk   : in  std_logic;
    rst_n : in  std_logic;
    a     : in  std_logic_vector(W - 1 downto 0);
    b     : in  std_logic_vector(W - 1 downto 0);
    mode  : in  std_logic;
    y     : out std_logic_vector(W - 1 downto 0);
    co    : out std_logic;
    ovf   : out std_logic;
    zero  : out std_logic;
    neg   : out std_logic
  );
end entity pipe_addsub;

architecture rtl of pipe_addsub is
  signal a1, b1, s2 : std_logic_vector(W - 1 downto 0) := (others => '0');
  signal m1, m1_prev, c2, v2 : std_logic := '0';
  signal m_use : std_logic;
  signal b_eff : std_logic_vector(W - 1 downto 0);
  signal sum : unsigned(W downto 0);
begin
  m_use <= m1_prev when BUG = 1 else m1;
  b_eff <= b1 xor (b1'range => m_use);
  sum <= unsigned('0' & a1) + unsigned('0' & b_eff) + ("" & m_use);

  process (clk)
  begin
    if rising_edge(clk) then
      if rst_n = '0' then
        a1 <= (others => '0'); b1 <= (others => '0'); m1 <= '0'; m1_prev <= '0';
        s2 <= (others => '0'); c2 <= '0'; v2 <= '0';
        y <= (others => '0'); ovf <= '0'; zero <= '0'; neg <= '0';
        if BUG /= 2 then
          co <= '0';
        end if;
      else
        a1 <= a; b1 <= b; m1 <= mode; m1_prev <= m1;
        s2 <= std_logic_vector(sum(W - 1 downto 0));
        c2 <= sum(W);
        if a1(W - 1) = b_eff(W - 1) and sum(W - 1) /= a1(W - 1) then
          v2 <= '1';
        else
          v2 <= '0';
        end if;
        y <= s2; co <= c2; ovf <= v2; neg <= s2(W - 1);
        if s2 = (s2'range => '0') then
          zero <= '1';
        else
          zero <= '0';
        end if;
      end if;
    end if;
  end process;
end architecture rtl;
