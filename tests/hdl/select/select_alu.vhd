-- select_alu: the VHDL-2008 twin of select_alu.v (invented unit): a W-bit two's-complement
-- ALU behind a 4-bit operation select.
--   op x"0": rd = a + b        op x"1": rd = a - b
--   op x"5": compare a, b (lt, eq, gt; signed)      op x"6": rd = -a
-- co is the carry out of add and the borrow of sub and negate (0 - a); v is signed overflow;
-- z is result zero; n is the result sign. During compare rd and the arithmetic flags are 0;
-- during add, sub and negate lt, eq and gt are 0. ZERO_ACTIVE_LOW = 1 makes z active low;
-- BUG = 1 inverts the zero flag's polarity against it.
library ieee;
use ieee.std_logic_1164.all;
use ieee.numeric_std.all;

entity select_alu is
    generic (
        W               : natural := 8;
        ZERO_ACTIVE_LOW : natural := 0;
        BUG             : natural := 0);
    port (
        a  : in  std_logic_vector(W - 1 downto 0);
        b  : in  std_logic_vector(W - 1 downto 0);
        op : in  std_logic_vector(3 downto 0);
        rd : out std_logic_vector(W - 1 downto 0);
        co : out std_logic;
        v  : out std_logic;
        z  : out std_logic;
        n  : out std_logic;
        lt : out std_logic;
        eq : out std_logic;
        gt : out std_logic);
end entity select_alu;

architecture behavioural of select_alu is
begin
    process (all)
        variable wide : unsigned(W downto 0);
        variable r    : std_logic_vector(W - 1 downto 0);
        variable arith : boolean;
    begin
        wide := (others => '0');
        r := (others => '0');
        co <= '0'; v <= '0'; z <= '0'; n <= '0';
        lt <= '0'; eq <= '0'; gt <= '0';
        arith := false;
        case op is
            when x"0" =>
                wide := unsigned('0' & a) + unsigned('0' & b);
                r := std_logic_vector(wide(W - 1 downto 0));
                co <= wide(W);
                if a(W - 1) = b(W - 1) and r(W - 1) /= a(W - 1) then v <= '1'; end if;
                arith := true;
            when x"1" =>
                wide := unsigned('0' & a) - unsigned('0' & b);
                r := std_logic_vector(wide(W - 1 downto 0));
                co <= wide(W);
                if a(W - 1) /= b(W - 1) and r(W - 1) /= a(W - 1) then v <= '1'; end if;
                arith := true;
            when x"6" =>
                wide := to_unsigned(0, W + 1) - unsigned('0' & a);
                r := std_logic_vector(wide(W - 1 downto 0));
                co <= wide(W);
                if a(W - 1) = '1' and r(W - 1) = '1' then v <= '1'; end if;
                arith := true;
            when x"5" =>
                if signed(a) < signed(b) then lt <= '1'; end if;
                if a = b then eq <= '1'; end if;
                if signed(a) > signed(b) then gt <= '1'; end if;
            when others =>
                null;
        end case;
        rd <= r;
        if arith then
            if ((unsigned(r) = 0) xor (BUG = 1)) xor (ZERO_ACTIVE_LOW = 1) then
                z <= '1';
            end if;
            n <= r(W - 1);
        end if;
    end process;
end architecture behavioural;
