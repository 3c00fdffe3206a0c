-- numeric_add: W-bit unsigned adder whose ports are ieee.numeric_std `unsigned`, as many
-- hand-written VHDL units declare them (no std_logic_vector wrapper):
--   y = (a + b) mod 2^W; co = carry out (bit W of the (W+1)-bit sum); zero = all y bits 0.
-- numeric_std's "+" on two unsigned operands returns the width of the wider operand and
-- wraps (IEEE 1076.3 / IEEE 1076-2008 clause 16.8, numeric_std; from memory), so the
-- operands are widened by one bit to keep the carry.
library ieee;
use ieee.std_logic_1164.all;
use ieee.numeric_std.all;

entity numeric_add is
    generic (
        W : natural := 16);
    port (
        a    : in  unsigned(W - 1 downto 0);
        b    : in  unsigned(W - 1 downto 0);
        y    : out unsigned(W - 1 downto 0);
        co   : out std_logic;
        zero : out std_logic);
end entity numeric_add;

architecture behavioural of numeric_add is
    signal sum : unsigned(W downto 0);
begin
    assert W >= 1 report "numeric_add needs W >= 1" severity failure;
    sum  <= ('0' & a) + ('0' & b);
    y    <= sum(W - 1 downto 0);
    co   <= sum(W);
    zero <= '1' when sum(W - 1 downto 0) = 0 else '0';
end architecture behavioural;
