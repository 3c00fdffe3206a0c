-- addsub_unit: W-bit two's-complement add/subtract unit built from full_adder cells; the
-- VHDL-2008 twin of ../addsub_unit.v with the same ports and flags. Every bit of b is XORed
-- with mode and mode drives the adder's carry-in, so mode = '0' gives a + b and mode = '1'
-- gives a + not b + 1 = a - b.
--   y = result mod 2^W; co = raw adder carry out in both modes (in subtract mode NOT borrow,
--   the "carry" convention); ovf = carry into the MSB xor carry out of the MSB;
--   zero = all result bits 0; neg = result MSB.
library ieee;
use ieee.std_logic_1164.all;

entity addsub_unit is
    generic (
        W : natural := 16);
    port (
        a    : in  std_logic_vector(W - 1 downto 0);
        b    : in  std_logic_vector(W - 1 downto 0);
        mode : in  std_logic;
        y    : out std_logic_vector(W - 1 downto 0);
        co   : out std_logic;
        ovf  : out std_logic;
        zero : out std_logic;
        neg  : out std_logic);
end entity addsub_unit;

architecture structural of addsub_unit is
    -- carry(i) is the carry into bit i; carry(W) is the carry out of the word.
    signal carry : std_logic_vector(W downto 0);
    signal b_eff : std_logic_vector(W - 1 downto 0);
    signal sum   : std_logic_vector(W - 1 downto 0);
begin
    assert W >= 1 report "addsub_unit needs W >= 1" severity failure;

    carry(0) <= mode;

    g_bit : for i in 0 to W - 1 generate
        b_eff(i) <= b(i) xor mode;
        u_cell : entity work.full_adder
            port map (
                a    => a(i),
                b    => b_eff(i),
                cin  => carry(i),
                s    => sum(i),
                cout => carry(i + 1));
    end generate g_bit;

    y    <= sum;
    co   <= carry(W);
    ovf  <= carry(W - 1) xor carry(W);
    zero <= nor sum;  -- VHDL-2008 unary reduction operator
    neg  <= sum(W - 1);
end architecture structural;
